import { createColumnHelper } from '@tanstack/react-table';
import { BALANCE_SORT_KEYS, BALANCE_STATUSES, type Balance } from '../../../../shared/schemas/inventory.ts';
import { CalibrationDueCell, StatusBadge } from '../components/badges.tsx';
import { Num, RecordLink } from '../components/cells.tsx';
import { label, STATUS_LABELS } from '../format.ts';
import { InventoryListPage, type ListConfig } from '../inventory-list-page.tsx';
import { KIND_INFO } from '../kinds.ts';

const col = createColumnHelper<Balance>();

export const balanceColumns = [
  col.accessor('identifier', {
    header: 'Identifier',
    meta: { nowrap: true },
    cell: (c) => <RecordLink to={`${KIND_INFO.balances.pagePath}/${c.row.original.id}`}>{c.getValue()}</RecordLink>,
  }),
  // status and calibration due next to the identifier: visible on a tablet without scrolling sideways
  col.accessor('status', { header: 'Status', cell: (c) => <StatusBadge status={c.getValue()} /> }),
  col.accessor('calibrationDueOn', { header: 'Calibration due', cell: (c) => <CalibrationDueCell dueOn={c.getValue()} /> }),
  col.accessor('description', {
    header: 'Description',
    cell: (c) => (
      <span>
        {c.getValue()}
        {c.row.original.location ? <span className="block text-sm text-ink-soft">{c.row.original.location}</span> : null}
      </span>
    ),
  }),
  col.accessor('capacityG', { header: 'Capacity (Max)', enableSorting: false, meta: { numeric: true }, cell: (c) => <Num value={c.getValue()} unit="g" /> }),
  col.accessor('readabilityMg', { header: 'Readability d', enableSorting: false, meta: { numeric: true }, cell: (c) => <Num value={c.getValue()} unit="mg" /> }),
  col.accessor('minWeightMg', { header: 'Minimum weight', enableSorting: false, meta: { numeric: true }, cell: (c) => <Num value={c.getValue()} unit="mg" /> }),
];

export const balanceListConfig: ListConfig<'balances'> = {
  kind: 'balances',
  intro: 'Analytical balances with readability, USP <41> minimum weight and calibration due date.',
  defaults: { extraParam: 'usable', sort: 'identifier', sortKeys: BALANCE_SORT_KEYS },
  statusOptions: BALANCE_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })),
  extra: {
    label: 'Usable now',
    options: [
      { value: '', label: 'All balances' },
      { value: '1', label: 'Only usable (in service, calibration in date)' },
    ],
  },
  searchPlaceholder: 'Identifier, description, location…',
  columns: balanceColumns,
  minWidth: '56rem',
};

export function BalanceListPage() {
  return <InventoryListPage config={balanceListConfig} />;
}
