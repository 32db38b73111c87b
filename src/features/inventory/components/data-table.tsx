/**
 * A server-driven table: sorting, filtering and paging happen in SQL on the server, so the table is
 * told `manualSorting`, `manualPagination` and `manualFiltering` and only renders the page it is given.
 * Sortable headers are buttons with `aria-sort` on the header cell. The table scrolls sideways inside
 * its own box on narrow screens, so the page itself never grows wider than the viewport (`contain: inline-size`
 * keeps the table's width out of the page layout).
 */
import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type OnChangeFn, type PaginationState, type SortingState } from '@tanstack/react-table';

declare module '@tanstack/react-table' {
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface ColumnMeta<TData, TValue> {
    /** right-aligned, tabular figures */
    numeric?: boolean;
    /** keep the cell on one line */
    nowrap?: boolean;
  }
}

export interface DataTableProps<T> {
  caption: string;
  data: T[];
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<T, any>[];
  total: number;
  sorting: SortingState;
  onSortingChange: OnChangeFn<SortingState>;
  pagination: PaginationState;
  onPaginationChange: OnChangeFn<PaginationState>;
  rowId: (row: T) => string;
  /** minimum table width before it scrolls sideways */
  minWidth?: string;
  /** true while a newer page is loading (the old rows stay, dimmed) */
  stale?: boolean;
  testId?: string;
  empty?: string;
}

function sortIcon(dir: false | 'asc' | 'desc') {
  if (dir === 'asc') return '▲';
  if (dir === 'desc') return '▼';
  return '↕';
}

export function DataTable<T>({
  caption,
  data,
  columns,
  total,
  sorting,
  onSortingChange,
  pagination,
  onPaginationChange,
  rowId,
  minWidth = '52rem',
  stale = false,
  testId,
  empty = 'Nothing matches these filters.',
}: DataTableProps<T>) {
  const table = useReactTable({
    data,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: rowId,
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    sortDescFirst: false,
    rowCount: total,
    state: { sorting, pagination },
    onSortingChange,
    onPaginationChange,
  });

  return (
    <div className="max-w-full overflow-x-auto rounded-xl border-2 border-line bg-card [contain:inline-size]" data-testid={testId ? `${testId}-scroll` : undefined}>
      <table
        className={`w-full border-collapse text-left transition-opacity ${stale ? 'opacity-60' : ''}`}
        style={{ minWidth }}
        data-testid={testId}
        aria-busy={stale || undefined}
      >
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-slate-100 text-sm">
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id}>
              {hg.headers.map((h) => {
                const canSort = h.column.getCanSort();
                const dir = h.column.getIsSorted();
                const numeric = h.column.columnDef.meta?.numeric;
                const content = h.isPlaceholder ? null : flexRender(h.column.columnDef.header, h.getContext());
                return (
                  <th
                    key={h.id}
                    scope="col"
                    aria-sort={canSort ? (dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : 'none') : undefined}
                    className={`px-0 py-1 align-bottom font-semibold ${numeric ? 'text-right' : ''}`}
                  >
                    {canSort ? (
                      <button
                        type="button"
                        onClick={h.column.getToggleSortingHandler()}
                        data-testid={`sort-${h.column.id}`}
                        className={`inline-flex min-h-12 items-center gap-2 rounded-lg px-2 text-left hover:bg-white ${numeric ? 'flex-row-reverse text-right' : ''} ${dir ? 'text-ink' : 'text-ink-soft'}`}
                      >
                        <span>{content}</span>
                        <span aria-hidden="true" className={`text-xs ${dir ? 'text-brass-600' : 'text-ink-soft/70'}`}>
                          {sortIcon(dir)}
                        </span>
                      </button>
                    ) : (
                      <span className="inline-flex min-h-12 items-center px-2 text-ink-soft">{content}</span>
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.length === 0 ? (
            <tr>
              <td colSpan={columns.length} className="px-4 py-8 text-center text-ink-soft" data-testid="table-empty">
                {empty}
              </td>
            </tr>
          ) : (
            table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-line align-middle even:bg-paper/60" data-testid="inventory-row">
                {row.getVisibleCells().map((cell) => {
                  const meta = cell.column.columnDef.meta;
                  return (
                    <td
                      key={cell.id}
                      className={`px-2 py-2 ${meta?.numeric ? 'num text-right text-lg whitespace-nowrap' : 'text-base'} ${meta?.nowrap ? 'whitespace-nowrap' : ''}`}
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  );
                })}
              </tr>
            ))
          )}
        </tbody>
      </table>
    </div>
  );
}
