import { MATERIAL_INPUT_STATUSES, solventCreateInputSchema, solventUpdateInputSchema, type Solvent } from '../../../../shared/schemas/inventory.ts';
import { ExpiryCell } from '../components/badges.tsx';
import { withUnit } from '../components/detail-list.tsx';
import type { FormSection, FormValues } from '../components/record-form.tsx';
import { label, STATUS_LABELS } from '../format.ts';
import { RecordCreatePage, RecordDetailPage, type CreateConfig, type DetailConfig } from '../record-pages.tsx';

const sections: FormSection[] = [
  {
    title: 'Solvent or diluent lot',
    fields: [
      { name: 'name', label: 'Name', hint: 'e.g. Nitric acid 2 % (v/v)' },
      { name: 'grade', label: 'Grade' },
      { name: 'lot', label: 'Lot' },
      { name: 'expiresOn', label: 'Expires on', type: 'date', hint: 'Leave empty for water drawn fresh on the day' },
      { name: 'density20cGPerMl', label: 'Density at 20 °C', type: 'decimal', suffix: 'g/mL', hint: 'e.g. 0.99820 for water' },
      { name: 'expansionCoefficientPerK', label: 'Volume expansion coefficient', type: 'decimal', suffix: '1/K', hint: 'e.g. 0.000207 for water' },
      { name: 'status', label: 'Status', type: 'select', options: MATERIAL_INPUT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })) },
    ],
  },
];

const s = (v: string | null | undefined) => v ?? '';

function toForm(x: Solvent): FormValues {
  return {
    name: x.name,
    grade: s(x.grade),
    lot: x.lot,
    density20cGPerMl: s(x.density20cGPerMl),
    expansionCoefficientPerK: s(x.expansionCoefficientPerK),
    expiresOn: s(x.expiresOn),
    status: x.status === 'retired' ? 'quarantined' : x.status,
  };
}

export const solventDetailConfig: DetailConfig<'solvents'> = {
  kind: 'solvents',
  title: (x) => x.name,
  subtitle: (x) => (
    <span>
      Lot <span className="num font-semibold text-ink">{x.lot}</span>
      {x.grade ? ` · ${x.grade}` : ''}
    </span>
  ),
  rows: (x) => [
    { label: 'Name', value: x.name },
    { label: 'Grade', value: x.grade },
    { label: 'Lot', value: x.lot, numeric: true },
    { label: 'Density at 20 °C', value: withUnit(x.density20cGPerMl, 'g/mL'), numeric: true },
    { label: 'Volume expansion coefficient', value: withUnit(x.expansionCoefficientPerK, '1/K'), numeric: true },
    { label: 'Expires on', value: <ExpiryCell expiresOn={x.expiresOn} /> },
  ],
  sections,
  updateSchema: solventUpdateInputSchema,
  toForm,
};

export const solventCreateConfig: CreateConfig<'solvents'> = {
  kind: 'solvents',
  sections,
  createSchema: solventCreateInputSchema,
  intro: 'Solvent and diluent lots. The density at 20 °C and the expansion coefficient feed the volume corrections.',
  empty: { name: '', grade: '', lot: '', density20cGPerMl: '', expansionCoefficientPerK: '', expiresOn: '', status: 'accepted' },
};

export function SolventDetailPage() {
  return <RecordDetailPage config={solventDetailConfig} />;
}

export function SolventCreatePage() {
  return <RecordCreatePage config={solventCreateConfig} />;
}
