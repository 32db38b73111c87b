import { createColumnHelper } from '@tanstack/react-table';
import { WARE_KINDS, WARE_SORT_KEYS, WARE_STATUSES, type VolumetricWare } from '../../../../shared/schemas/inventory.ts';
import { StatusBadge } from '../components/badges.tsx';
import { Num, RecordLink } from '../components/cells.tsx';
import { label, STATUS_LABELS, WARE_CLASS_LABELS, WARE_KIND_LABELS } from '../format.ts';
import { InventoryListPage, type ListConfig } from '../inventory-list-page.tsx';
import { KIND_INFO } from '../kinds.ts';

const col = createColumnHelper<VolumetricWare>();

export const wareColumns = [
  col.accessor('identifier', {
    header: 'Identifier',
    meta: { nowrap: true },
    cell: (c) => <RecordLink to={`${KIND_INFO['volumetric-ware'].pagePath}/${c.row.original.id}`}>{c.getValue()}</RecordLink>,
  }),
  col.accessor('kind', { header: 'Kind', cell: (c) => label(WARE_KIND_LABELS, c.getValue()) }),
  col.accessor('nominalVolumeMl', { header: 'Nominal volume', meta: { numeric: true }, cell: (c) => <Num value={c.getValue()} unit="mL" /> }),
  col.accessor('class', { header: 'Class', cell: (c) => label(WARE_CLASS_LABELS, c.getValue()) }),
  col.accessor('toleranceMl', { header: 'Tolerance', enableSorting: false, meta: { numeric: true }, cell: (c) => <Num value={c.getValue() ? `± ${c.getValue()}` : null} unit="mL" /> }),
  col.accessor('status', { header: 'Status', cell: (c) => <StatusBadge status={c.getValue()} /> }),
];

export const wareListConfig: ListConfig<'volumetric-ware'> = {
  kind: 'volumetric-ware',
  intro: 'Volumetric flasks and pipettes with class and tolerance at nominal volume.',
  defaults: { extraParam: 'kind', sort: 'identifier', sortKeys: WARE_SORT_KEYS },
  statusOptions: WARE_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })),
  extra: { label: 'Kind', options: [{ value: '', label: 'Any kind' }, ...WARE_KINDS.map((k) => ({ value: k, label: label(WARE_KIND_LABELS, k) }))] },
  searchPlaceholder: 'Identifier, material…',
  columns: wareColumns,
  minWidth: '50rem',
};

export function WareListPage() {
  return <InventoryListPage config={wareListConfig} />;
}
