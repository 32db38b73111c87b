import { BALANCE_INPUT_STATUSES, balanceCreateInputSchema, balanceUpdateInputSchema, type Balance } from '../../../../shared/schemas/inventory.ts';
import { uspMinimumWeight } from '../../../../shared/calc/min-weight.ts';
import { Panel } from '../../../components/ui/feedback.tsx';
import { CalibrationDueCell } from '../components/badges.tsx';
import { DetailList, withUnit } from '../components/detail-list.tsx';
import type { FormSection, FormValues } from '../components/record-form.tsx';
import { formatDate, label, STATUS_LABELS } from '../format.ts';
import { RecordCreatePage, RecordDetailPage, type CreateConfig, type DetailConfig } from '../record-pages.tsx';

const sections = (computedMinWeight?: string | null): FormSection[] => [
  {
    title: 'Identity',
    fields: [
      { name: 'identifier', label: 'Identifier', hint: 'As on the balance label, e.g. BAL-A1' },
      { name: 'description', label: 'Description', hint: 'Make, model, serial' },
      { name: 'location', label: 'Location' },
      { name: 'status', label: 'Status', type: 'select', options: BALANCE_INPUT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })) },
    ],
  },
  {
    title: 'Weighing range',
    fields: [
      { name: 'capacityG', label: 'Capacity (Max)', type: 'decimal', suffix: 'g' },
      { name: 'readabilityMg', label: 'Readability d', type: 'decimal', suffix: 'mg', hint: 'Scale interval, e.g. 0.01' },
      { name: 'weightDensityGPerMl', label: 'Calibration-weight density', type: 'decimal', suffix: 'g/mL', hint: 'Conventional value 8.0 (OIML R 111)' },
    ],
  },
  {
    title: 'Minimum weight (USP <41>)',
    fields: [
      { name: 'repeatabilitySdMg', label: 'Repeatability s', type: 'decimal', suffix: 'mg', hint: 'Standard deviation of at least 10 replicate weighings' },
      { name: 'minWeightSafetyFactor', label: 'Safety factor SF', type: 'decimal', hint: 'Set by the lab (USP <1251>), e.g. 2' },
      { name: 'minWeightDeterminedOn', label: 'Determined on', type: 'date' },
      {
        name: 'minWeightMg',
        label: 'Minimum weight m_min',
        type: 'decimal',
        suffix: 'mg',
        hint: computedMinWeight
          ? `Now ${computedMinWeight} mg, computed from s and d. Leave empty to keep computing it.`
          : 'Leave empty to compute 2000·max(s, 0.41 d) × SF from s and d.',
      },
    ],
  },
  {
    title: 'Calibration',
    fields: [
      { name: 'calibratedOn', label: 'Calibrated on', type: 'date' },
      { name: 'calibrationDueOn', label: 'Calibration due on', type: 'date', hint: 'The balance may be used on this day, not after' },
      { name: 'calibrationUncertaintyMg', label: 'Calibration uncertainty U', type: 'decimal', suffix: 'mg' },
      { name: 'calibrationUncertaintyK', label: 'Coverage factor k', type: 'decimal' },
    ],
  },
];

const s = (v: string | null | undefined) => v ?? '';

function toForm(b: Balance): FormValues {
  return {
    identifier: b.identifier,
    description: b.description,
    location: s(b.location),
    capacityG: b.capacityG,
    readabilityMg: b.readabilityMg,
    // A computed m_min is not typed into the form: left empty, the server keeps computing it from s and d.
    minWeightMg: b.minWeightComputed ? '' : s(b.minWeightMg),
    minWeightDeterminedOn: s(b.minWeightDeterminedOn),
    repeatabilitySdMg: s(b.repeatabilitySdMg),
    minWeightSafetyFactor: s(b.minWeightSafetyFactor),
    calibratedOn: s(b.calibratedOn),
    calibrationDueOn: s(b.calibrationDueOn),
    calibrationUncertaintyMg: s(b.calibrationUncertaintyMg),
    calibrationUncertaintyK: s(b.calibrationUncertaintyK),
    weightDensityGPerMl: b.weightDensityGPerMl,
    status: b.status === 'retired' ? 'out_of_service' : b.status,
  };
}

/**
 * The USP <41> figure redone from the stored s, d and SF with the shared core, so the reader can see
 * what the stored m_min corresponds to (with and without the safety factor). Null when s is missing.
 */
function recompute(s: string | null, d: string, sf: string | null): { bare: string; withSf: string | null } | null {
  if (!s) return null;
  try {
    const bare = uspMinimumWeight({ repeatabilitySd: s, readability: d }).minimumWeight;
    const withSf = sf ? uspMinimumWeight({ repeatabilitySd: s, readability: d, safetyFactor: sf }).minimumWeight : null;
    return { bare: bare.toString(), withSf: withSf ? withSf.toString() : null };
  } catch {
    return null; // values the core refuses (e.g. SF < 1) are simply not redone here
  }
}

/** The minimum weight with everything it rests on, so anyone can redo it by hand. */
function MinWeightPanel({ b }: { b: Balance }) {
  const d = b.minWeightReadabilityMg ?? b.readabilityMg;
  const redo = recompute(b.repeatabilitySdMg, d, b.minWeightSafetyFactor);
  return (
    <Panel title="Minimum weight" id="min-weight">
      <div className="flex flex-col gap-4" data-testid="min-weight">
        <p className="flex flex-wrap items-baseline gap-x-3">
          <span className="text-sm font-semibold text-ink-soft">m_min</span>
          <span className="num text-4xl font-bold" data-testid="min-weight-value">
            {b.minWeightMg ?? '—'}
          </span>
          {b.minWeightMg ? <span className="text-xl text-ink-soft">mg</span> : null}
          <span className="text-sm text-ink-soft">{b.minWeightComputed ? '(computed by Tarebook from s and d)' : b.minWeightMg ? '(entered)' : '(not determined)'}</span>
        </p>
        <DetailList
          rows={[
            { label: 'Repeatability s', value: withUnit(b.repeatabilitySdMg, 'mg'), numeric: true },
            { label: 'Readability d', value: withUnit(d, 'mg'), numeric: true },
            { label: 'Safety factor SF', value: b.minWeightSafetyFactor, numeric: true },
            { label: 'Determined on', value: formatDate(b.minWeightDeterminedOn) },
          ]}
        />
        <p className="rounded-lg bg-slate-100 px-4 py-3 text-base" data-testid="min-weight-basis">
          Basis: USP &lt;41&gt;: <span className="num">m_min = 2000·max(s, 0.41 d) × SF</span>. Net weighings below m_min are
          refused; the safety factor (USP &lt;1251&gt;) keeps routine weighings clear of it.
        </p>
        {redo ? (
          <p className="text-base" data-testid="min-weight-redo">
            From the values above: 2000·max(<span className="num">{b.repeatabilitySdMg}</span>, 0.41 × <span className="num">{d}</span>) ={' '}
            <span className="num font-semibold">{redo.bare}</span> mg
            {redo.withSf ? (
              <>
                ; × SF <span className="num">{b.minWeightSafetyFactor}</span> = <span className="num font-semibold">{redo.withSf}</span> mg
              </>
            ) : null}
            .
          </p>
        ) : null}
      </div>
    </Panel>
  );
}

export const balanceDetailConfig: DetailConfig<'balances'> = {
  kind: 'balances',
  title: (b) => b.identifier,
  subtitle: (b) => (
    <span>
      {b.description}
      {b.location ? ` · ${b.location}` : ''}
    </span>
  ),
  rows: (b) => [
    { label: 'Identifier', value: b.identifier, numeric: true },
    { label: 'Description', value: b.description },
    { label: 'Location', value: b.location },
    { label: 'Capacity (Max)', value: withUnit(b.capacityG, 'g'), numeric: true },
    { label: 'Readability d', value: withUnit(b.readabilityMg, 'mg'), numeric: true, testId: 'detail-readability' },
    { label: 'Calibration-weight density', value: withUnit(b.weightDensityGPerMl, 'g/mL'), numeric: true },
    { label: 'Calibrated on', value: formatDate(b.calibratedOn) },
    { label: 'Calibration due on', value: <CalibrationDueCell dueOn={b.calibrationDueOn} /> },
    {
      label: 'Calibration uncertainty',
      value: b.calibrationUncertaintyMg ? (
        <>
          ± {b.calibrationUncertaintyMg} <span className="font-sans text-base text-ink-soft">mg</span>
          {b.calibrationUncertaintyK ? ` (k = ${b.calibrationUncertaintyK})` : ''}
        </>
      ) : null,
      numeric: true,
    },
  ],
  panels: (b) => <MinWeightPanel b={b} />,
  sections: (b) => sections(b.minWeightComputed ? b.minWeightMg : null),
  updateSchema: balanceUpdateInputSchema,
  toForm,
};

export const balanceCreateConfig: CreateConfig<'balances'> = {
  kind: 'balances',
  sections: sections(),
  createSchema: balanceCreateInputSchema,
  intro: 'A balance needs its readability and calibration due date before it can be used. Give s and d and Tarebook computes the USP <41> minimum weight.',
  empty: {
    identifier: '',
    description: '',
    location: '',
    capacityG: '',
    readabilityMg: '',
    minWeightMg: '',
    minWeightDeterminedOn: '',
    repeatabilitySdMg: '',
    minWeightSafetyFactor: '',
    calibratedOn: '',
    calibrationDueOn: '',
    calibrationUncertaintyMg: '',
    calibrationUncertaintyK: '',
    weightDensityGPerMl: '8.0',
    status: 'in_service',
  },
};

export function BalanceDetailPage() {
  return <RecordDetailPage config={balanceDetailConfig} />;
}

export function BalanceCreatePage() {
  return <RecordCreatePage config={balanceCreateConfig} />;
}
