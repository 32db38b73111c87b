/**
 * One list page for every register. The address bar holds the view (search, filters, sort, page), the
 * server does the work in SQL, and the previous page stays on screen while the next one loads.
 */
import { useEffect, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import type { ColumnDef, PaginationState, SortingState, Updater } from '@tanstack/react-table';
import { Banner, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import { useDebouncedValue } from '../../hooks/use-debounced-value.ts';
import { useAuth } from '../auth/use-auth.ts';
import { listQuery, type ItemOf } from './api/inventory-queries.ts';
import { DataTable } from './components/data-table.tsx';
import { InventoryTabs } from './components/inventory-tabs.tsx';
import { ListToolbar, type Option } from './components/list-toolbar.tsx';
import { Pager } from './components/pager.tsx';
import { INVENTORY_WRITE_ROLES, KIND_INFO, type InventoryKind } from './kinds.ts';
import { readListParams, writeListParams, type ListDefaults, type ListParams } from './list-params.ts';

export interface ListConfig<K extends InventoryKind> {
  kind: K;
  intro: string;
  defaults: ListDefaults;
  statusOptions: Option[];
  extra?: { label: string; options: Option[] };
  searchPlaceholder: string;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<ItemOf<K>, any>[];
  minWidth: string;
}

const SEARCH_DEBOUNCE_MS = 300;

function resolve<T>(u: Updater<T>, old: T): T {
  return typeof u === 'function' ? (u as (o: T) => T)(old) : u;
}

export function InventoryListPage<K extends InventoryKind>({ config }: { config: ListConfig<K> }) {
  const { kind, defaults } = config;
  const info = KIND_INFO[kind];
  const auth = useAuth();
  const [sp, setSp] = useSearchParams();
  const params = readListParams(sp, defaults);

  const go = (next: Partial<ListParams>, replace = false) =>
    setSp(writeListParams({ ...params, ...next }, defaults), { replace });

  // Search: typed text is local; once it rests for a moment it goes to the URL (and from there to the API).
  const [searchText, setSearchText] = useState(params.search);
  const debounced = useDebouncedValue(searchText, SEARCH_DEBOUNCE_MS);
  useEffect(() => {
    if (debounced.trim() !== params.search) go({ search: debounced, page: 1 }, true);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [debounced]);
  // The URL changed from outside (back button, a link): show its search text.
  useEffect(() => {
    if (params.search !== debounced.trim()) setSearchText(params.search);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [params.search]);

  const list = useQuery(listQuery(kind, params, defaults));
  const data = list.data;
  const total = data?.total ?? 0;

  const sorting: SortingState = [{ id: params.sort, desc: params.dir === 'desc' }];
  const pagination: PaginationState = { pageIndex: params.page - 1, pageSize: params.pageSize };
  const onSortingChange = (u: Updater<SortingState>) => {
    const next = resolve(u, sorting)[0];
    if (next) go({ sort: next.id, dir: next.desc ? 'desc' : 'asc', page: 1 });
  };
  const onPaginationChange = (u: Updater<PaginationState>) => {
    const next = resolve(u, pagination);
    go({ page: next.pageIndex + 1, pageSize: next.pageSize });
  };

  const canWrite = auth.status === 'signed-in' && (INVENTORY_WRITE_ROLES as readonly string[]).includes(auth.user.role);

  return (
    <div className="flex min-w-0 flex-col gap-4" data-testid={`inventory-list-${kind}`}>
      <InventoryTabs />
      <div className="flex flex-wrap items-start justify-between gap-4">
        <PageHeader title={info.title}>{config.intro}</PageHeader>
        {canWrite ? (
          <Link
            to={`${info.pagePath}/new`}
            data-testid="create-link"
            className="inline-flex min-h-12 items-center justify-center rounded-lg border-2 border-slate-700 bg-slate-700 px-5 font-semibold text-white hover:bg-slate-900"
          >
            Add {info.singular}
          </Link>
        ) : null}
      </div>

      <ListToolbar
        search={searchText}
        onSearch={setSearchText}
        searchPlaceholder={config.searchPlaceholder}
        status={params.status}
        statusOptions={config.statusOptions}
        onStatus={(status) => go({ status, page: 1 })}
        extra={
          config.extra && defaults.extraParam
            ? { id: defaults.extraParam, label: config.extra.label, value: params.extra, options: config.extra.options, onChange: (extra) => go({ extra, page: 1 }) }
            : undefined
        }
      />

      {list.isError ? <Banner title={`Could not load the ${info.title.toLowerCase()}`}>{list.error.message}</Banner> : null}
      {list.isPending ? <Spinner label={`Loading ${info.title.toLowerCase()}…`} /> : null}
      {data ? (
        <>
          <DataTable
            caption={info.title}
            data={data.items}
            columns={config.columns}
            total={total}
            sorting={sorting}
            onSortingChange={onSortingChange}
            pagination={pagination}
            onPaginationChange={onPaginationChange}
            rowId={(r) => String(r.id)}
            minWidth={config.minWidth}
            stale={list.isPlaceholderData}
            testId="inventory-table"
          />
          {data.items.length === 0 && total > 0 ? (
            <Banner tone="info" title="This page is past the last row">
              <button type="button" className="mt-2 min-h-12 font-semibold underline underline-offset-4" onClick={() => go({ page: 1 })}>
                Go to the first page
              </button>
            </Banner>
          ) : null}
          <Pager
            page={params.page}
            pageSize={params.pageSize}
            total={total}
            onPage={(page) => onPaginationChange({ pageIndex: page - 1, pageSize: params.pageSize })}
            onPageSize={(pageSize) => go({ pageSize, page: 1 })}
          />
        </>
      ) : null}
    </div>
  );
}
