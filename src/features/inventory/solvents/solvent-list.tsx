import { createColumnHelper } from '@tanstack/react-table';
import { LOT_STATUSES, SOLVENT_SORT_KEYS, type Solvent } from '../../../../shared/schemas/inventory.ts';
import { ExpiryCell, StatusBadge } from '../components/badges.tsx';
import { Num, RecordLink } from '../components/cells.tsx';
import { label, STATUS_LABELS } from '../format.ts';
import { InventoryListPage, type ListConfig } from '../inventory-list-page.tsx';
import { KIND_INFO } from '../kinds.ts';

const col = createColumnHelper<Solvent>();

export const solventColumns = [
  col.accessor('name', {
    header: 'Name',
    cell: (c) => <RecordLink to={`${KIND_INFO.solvents.pagePath}/${c.row.original.id}`}>{c.getValue()}</RecordLink>,
  }),
  col.accessor('grade', { header: 'Grade', cell: (c) => c.getValue() ?? <span className="text-ink-soft">—</span> }),
  col.accessor('lot', { header: 'Lot', meta: { nowrap: true }, cell: (c) => <span className="num">{c.getValue()}</span> }),
  col.accessor('density20cGPerMl', { header: 'Density 20 °C', enableSorting: false, meta: { numeric: true }, cell: (c) => <Num value={c.getValue()} unit="g/mL" /> }),
  col.accessor('expiresOn', { header: 'Expiry', cell: (c) => <ExpiryCell expiresOn={c.getValue()} /> }),
  col.accessor('status', { header: 'Status', cell: (c) => <StatusBadge status={c.getValue()} /> }),
];

export const solventListConfig: ListConfig<'solvents'> = {
  kind: 'solvents',
  intro: 'Solvent and diluent lots with their density at 20 °C and expiry.',
  defaults: { sort: 'name', sortKeys: SOLVENT_SORT_KEYS },
  statusOptions: LOT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })),
  searchPlaceholder: 'Name, grade, lot…',
  columns: solventColumns,
  minWidth: '54rem',
};

export function SolventListPage() {
  return <InventoryListPage config={solventListConfig} />;
}
