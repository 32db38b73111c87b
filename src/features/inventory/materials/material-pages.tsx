import {
  MATERIAL_GRADES,
  MATERIAL_INPUT_STATUSES,
  PURITY_BASES,
  materialCreateInputSchema,
  materialUpdateInputSchema,
  type ReferenceMaterial,
} from '../../../../shared/schemas/inventory.ts';
import { CautionBox, Panel } from '../../../components/ui/feedback.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { Badge, ExpiryCell, StatusBadge } from '../components/badges.tsx';
import { CertificatesPanel } from '../components/certificates-panel.tsx';
import { withUnit } from '../components/detail-list.tsx';
import type { FormSection, FormValues } from '../components/record-form.tsx';
import { formatDate, formatPurity, GRADE_LABELS, label, STATUS_LABELS } from '../format.ts';
import { RecordCreatePage, RecordDetailPage, type CreateConfig, type DetailConfig } from '../record-pages.tsx';

/** UN GHS pictogram names (GHS Rev. 10, Annex 3). */
const PICTOGRAM_NAMES: Record<string, string> = {
  GHS01: 'Exploding bomb',
  GHS02: 'Flame',
  GHS03: 'Flame over circle',
  GHS04: 'Gas cylinder',
  GHS05: 'Corrosion',
  GHS06: 'Skull and crossbones',
  GHS07: 'Exclamation mark',
  GHS08: 'Health hazard',
  GHS09: 'Environment',
};

const sections: FormSection[] = [
  {
    title: 'Identity',
    fields: [
      { name: 'name', label: 'Name', hint: 'e.g. Lead(II) nitrate' },
      { name: 'formula', label: 'Formula', hint: 'As used for the molar mass, e.g. Pb(NO3)2 or CuSO4(H2O)5' },
      { name: 'grade', label: 'Grade', type: 'select', options: MATERIAL_GRADES.map((g) => ({ value: g, label: label(GRADE_LABELS, g) })) },
      { name: 'casNumber', label: 'CAS number', hint: 'e.g. 10099-74-8' },
      { name: 'producer', label: 'Producer' },
      { name: 'catalogueNumber', label: 'Catalogue number' },
      { name: 'lot', label: 'Lot' },
      { name: 'certificateNumber', label: 'Certificate number and version' },
      { name: 'analytes', label: 'Analytes', type: 'analytes' },
    ],
  },
  {
    title: 'Purity (mass fraction, from the certificate)',
    fields: [
      { name: 'purity.value', label: 'Purity P', type: 'decimal', hint: 'Mass fraction, e.g. 0.9995' },
      { name: 'purity.basis', label: 'Basis', type: 'select', options: PURITY_BASES.map((b) => ({ value: b, label: b === 'dried' ? 'Dried (as certified after drying)' : 'As is' })) },
      { name: 'purity.expandedUncertainty', label: 'Expanded uncertainty U', type: 'decimal', hint: 'Same unit as P, e.g. 0.0004' },
      { name: 'purity.k', label: 'Coverage factor k', type: 'decimal', hint: 'e.g. 2' },
      { name: 'purity.standardUncertainty', label: 'Standard uncertainty u (instead of U and k)', type: 'decimal', wide: true },
    ],
  },
  {
    title: 'Handling and dates',
    fields: [
      { name: 'densityGPerMl', label: 'Density', type: 'decimal', suffix: 'g/mL', hint: 'For the air-buoyancy correction' },
      { name: 'storage', label: 'Storage and handling' },
      { name: 'receivedOn', label: 'Received on', type: 'date' },
      { name: 'openedOn', label: 'Opened on', type: 'date' },
      { name: 'expiresOn', label: 'Expires on', type: 'date' },
      {
        name: 'status',
        label: 'Acceptance',
        type: 'select',
        options: MATERIAL_INPUT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })),
        hint: 'A lot stays quarantined until its label has been checked against the certificate.',
      },
    ],
  },
  {
    title: 'Hazards (from the safety data sheet)',
    fields: [
      { name: 'ghsPictograms', label: 'GHS pictograms', type: 'list', hint: 'Codes separated by commas, e.g. GHS07, GHS09' },
      { name: 'ghsHazardStatements', label: 'Hazard statements', type: 'list', hint: 'Codes separated by commas, e.g. H302, H410' },
    ],
  },
];

const s = (v: string | null | undefined) => v ?? '';

function toForm(m: ReferenceMaterial): FormValues {
  return {
    name: m.name,
    formula: m.formula,
    analytes: m.analytes.length ? m.analytes.map((a) => ({ name: a.name, formula: a.formula })) : [{ name: '', formula: '' }],
    casNumber: s(m.casNumber),
    grade: m.grade,
    producer: m.producer,
    catalogueNumber: s(m.catalogueNumber),
    lot: m.lot,
    certificateNumber: s(m.certificateNumber),
    purity: {
      value: m.purity.value,
      expandedUncertainty: s(m.purity.expandedUncertainty),
      k: s(m.purity.k),
      standardUncertainty: s(m.purity.standardUncertainty),
      basis: m.purity.basis,
    },
    densityGPerMl: s(m.densityGPerMl),
    receivedOn: s(m.receivedOn),
    openedOn: s(m.openedOn),
    expiresOn: s(m.expiresOn),
    storage: s(m.storage),
    ghsHazardStatements: m.ghsHazardStatements.join(', '),
    ghsPictograms: m.ghsPictograms.join(', '),
    status: m.status === 'retired' ? 'quarantined' : m.status,
  };
}

function HazardPanel({ m }: { m: ReferenceMaterial }) {
  const none = m.ghsPictograms.length === 0 && m.ghsHazardStatements.length === 0;
  return (
    <Panel title="Hazards" id="hazards">
      <div className="flex flex-col gap-4" data-testid="hazards">
        {none ? <p className="text-ink-soft">No GHS classification recorded for this lot.</p> : null}
        {m.ghsPictograms.length ? (
          <div>
            <h3 className="mb-2 text-sm font-semibold text-ink-soft">GHS pictograms</h3>
            <ul className="flex flex-wrap gap-2">
              {m.ghsPictograms.map((p) => (
                <li key={p} className="rounded-lg border-2 border-bad-700 bg-card px-3 py-2">
                  <span className="num font-bold">{p}</span>
                  {PICTOGRAM_NAMES[p] ? <span className="ml-2 text-ink-soft">{PICTOGRAM_NAMES[p]}</span> : null}
                </li>
              ))}
            </ul>
          </div>
        ) : null}
        {m.ghsHazardStatements.length ? (
          <div>
            <h3 className="mb-2 text-sm font-semibold text-ink-soft">Hazard statements</h3>
            <ul className="flex flex-wrap gap-2">
              {m.ghsHazardStatements.map((h) => (
                <li key={h}>
                  <Badge tone="muted">
                    <span className="num text-base text-ink">{h}</span>
                  </Badge>
                </li>
              ))}
            </ul>
          </div>
        ) : null}
        <CautionBox>Follow the SDS, local regulations and the laboratory&apos;s own procedures.</CautionBox>
      </div>
    </Panel>
  );
}

function AcceptancePanel({ m }: { m: ReferenceMaterial }) {
  return (
    <Panel title="Acceptance" id="acceptance">
      <div className="flex flex-wrap items-center gap-3" data-testid="acceptance">
        <StatusBadge status={m.status} />
        {m.status === 'accepted' ? (
          <span>
            {m.acceptedBy ? `Accepted by ${m.acceptedBy.fullName}` : 'Accepted'}
            {m.acceptedAt ? ` on ${formatDateTime(m.acceptedAt)}` : ''}
          </span>
        ) : null}
        {m.status === 'quarantined' ? <span>Not yet accepted: it cannot be used for a preparation until it is.</span> : null}
        {m.status === 'retired' ? <span>Retired: it can no longer be used for new preparations.</span> : null}
      </div>
    </Panel>
  );
}

export const materialDetailConfig: DetailConfig<'materials'> = {
  kind: 'materials',
  title: (m) => m.name,
  subtitle: (m) => (
    <span>
      Lot <span className="num font-semibold text-ink">{m.lot}</span> · {m.producer}
    </span>
  ),
  rows: (m) => [
    { label: 'Formula', value: m.formula, numeric: true },
    { label: 'Analytes', value: m.analytes.map((a) => `${a.name} (${a.formula})`).join(', ') },
    { label: 'Grade', value: label(GRADE_LABELS, m.grade) },
    { label: 'CAS number', value: m.casNumber, numeric: true },
    { label: 'Producer', value: m.producer },
    { label: 'Catalogue number', value: m.catalogueNumber },
    { label: 'Lot', value: m.lot, numeric: true },
    { label: 'Certificate number', value: m.certificateNumber },
    { label: 'Purity (mass fraction)', value: <span className="text-2xl font-bold">{formatPurity(m.purity)}</span>, numeric: true, testId: 'detail-purity' },
    { label: 'Purity basis', value: m.purity.basis === 'dried' ? 'Dried' : 'As is' },
    { label: 'Standard uncertainty u', value: m.purity.standardUncertainty, numeric: true },
    { label: 'Density', value: withUnit(m.densityGPerMl, 'g/mL'), numeric: true },
    { label: 'Received on', value: formatDate(m.receivedOn) },
    { label: 'Opened on', value: formatDate(m.openedOn) },
    { label: 'Expires on', value: <ExpiryCell expiresOn={m.expiresOn} /> },
    { label: 'Storage and handling', value: m.storage },
  ],
  panels: (m, canWrite) => (
    <>
      <div className="grid gap-5 xl:grid-cols-2">
        <AcceptancePanel m={m} />
        <HazardPanel m={m} />
      </div>
      <CertificatesPanel materialId={m.id} canWrite={canWrite} />
    </>
  ),
  sections,
  updateSchema: materialUpdateInputSchema,
  toForm,
};

export const materialCreateConfig: CreateConfig<'materials'> = {
  kind: 'materials',
  sections,
  createSchema: materialCreateInputSchema,
  intro: 'Enter the lot exactly as its certificate states it. A new lot starts quarantined until it has been checked and accepted.',
  empty: {
    name: '',
    formula: '',
    analytes: [{ name: '', formula: '' }],
    casNumber: '',
    grade: 'CRM',
    producer: '',
    catalogueNumber: '',
    lot: '',
    certificateNumber: '',
    purity: { value: '', expandedUncertainty: '', k: '', standardUncertainty: '', basis: 'as-is' },
    densityGPerMl: '',
    receivedOn: '',
    openedOn: '',
    expiresOn: '',
    storage: '',
    ghsHazardStatements: '',
    ghsPictograms: '',
    status: 'quarantined',
  },
};

export function MaterialDetailPage() {
  return <RecordDetailPage config={materialDetailConfig} />;
}

export function MaterialCreatePage() {
  return <RecordCreatePage config={materialCreateConfig} />;
}
