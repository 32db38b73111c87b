import { createColumnHelper } from '@tanstack/react-table';
import { LOT_STATUSES, MATERIAL_GRADES, MATERIAL_SORT_KEYS, type ReferenceMaterial } from '../../../../shared/schemas/inventory.ts';
import { ExpiryCell, StatusBadge } from '../components/badges.tsx';
import { RecordLink } from '../components/cells.tsx';
import { formatPurity, GRADE_LABELS, label, STATUS_LABELS } from '../format.ts';
import { InventoryListPage, type ListConfig } from '../inventory-list-page.tsx';
import { KIND_INFO } from '../kinds.ts';

const col = createColumnHelper<ReferenceMaterial>();

/** "0.9995 ± 0.0004" on the first line and "k = 2" under it, so the column stays narrow. */
function PurityCell({ purity }: { purity: ReferenceMaterial['purity'] }) {
  const full = formatPurity(purity);
  const k = purity.expandedUncertainty && purity.k ? ` (k = ${purity.k})` : '';
  const head = k ? full.slice(0, full.length - k.length) : full;
  return (
    <span data-testid="purity-cell" className="inline-flex flex-col items-end text-base">
      <span>{head}</span>
      {k ? (
        <>
          {' '}
          <span className="font-sans text-sm text-ink-soft">{k.trim()}</span>
        </>
      ) : null}
    </span>
  );
}

export const materialColumns = [
  col.accessor('name', {
    header: 'Name',
    cell: (c) => <RecordLink to={`${KIND_INFO.materials.pagePath}/${c.row.original.id}`} sub={c.row.original.producer}>{c.getValue()}</RecordLink>,
  }),
  col.accessor('formula', { header: 'Formula', enableSorting: false, cell: (c) => c.getValue() }),
  col.accessor('lot', { header: 'Lot', meta: { nowrap: true }, cell: (c) => c.getValue() }),
  col.accessor('grade', { header: 'Grade', cell: (c) => label(GRADE_LABELS, c.getValue()) }),
  col.accessor('purity', {
    id: 'purity',
    header: 'Purity (mass fraction)',
    enableSorting: false,
    meta: { numeric: true },
    cell: (c) => <PurityCell purity={c.getValue()} />,
  }),
  col.accessor('expiresOn', { header: 'Expiry', cell: (c) => <ExpiryCell expiresOn={c.getValue()} /> }),
  col.accessor('status', { header: 'Status', cell: (c) => <StatusBadge status={c.getValue()} /> }),
];

export const materialListConfig: ListConfig<'materials'> = {
  kind: 'materials',
  intro: 'Reference materials and reagents by lot, with purity, expiry and acceptance. Open a lot for its certificates and hazards.',
  defaults: { extraParam: 'grade', sort: 'name', sortKeys: MATERIAL_SORT_KEYS },
  statusOptions: LOT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })),
  extra: { label: 'Grade', options: [{ value: '', label: 'Any grade' }, ...MATERIAL_GRADES.map((g) => ({ value: g, label: label(GRADE_LABELS, g) }))] },
  searchPlaceholder: 'Name, formula, lot, producer, CAS…',
  columns: materialColumns,
  minWidth: '54rem',
};

export function MaterialListPage() {
  return <InventoryListPage config={materialListConfig} />;
}
