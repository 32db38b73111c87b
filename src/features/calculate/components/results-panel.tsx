import type { ReactNode } from 'react';
import { D } from '../../../../shared/calc/decimal.ts';
import type { PreparationView, SigFigView } from '../result-types.ts';
import { fixed, sig } from '../format-result.ts';
import { fieldId } from '../../../components/ui/field.tsx';
import type { LiveResult } from '../live-calculation.ts';
import { FIELD_LABELS, type FormField } from '../calc-form-schema.ts';

function Stat({ label, value, unit, testId, hint }: { label: string; value: string; unit?: string; testId: string; hint?: ReactNode }) {
  return (
    <div className="rounded-lg border-2 border-line bg-card px-3 py-2">
      <dt className="text-sm font-semibold text-ink-soft">{label}</dt>
      <dd className="mt-1">
        <span data-testid={testId} className="num text-2xl font-semibold">
          {value}
        </span>
        {unit ? <span className="ml-2 text-base text-ink-soft">{unit}</span> : null}
        {hint ? <span className="mt-0.5 block text-sm text-ink-soft">{hint}</span> : null}
      </dd>
    </div>
  );
}

function kgPerM3(gPerMl: string | undefined): string {
  if (!gPerMl) return '—';
  try {
    return sig(new D(gPerMl).mul(1000).toString(), 5);
  } catch {
    return '—';
  }
}

function sigFigText(s: SigFigView | undefined, unit: string): { main: string; note?: string } | null {
  if (!s) return null;
  // The core has reported the count as a number and, in earlier versions, as a string `count`.
  const loose = s as { value: string; significantFigures?: number | string; count?: string; limitedBy?: string };
  const n = loose.significantFigures ?? loose.count;
  const parts: string[] = [];
  if (n !== undefined && n !== '') parts.push(`${n} significant figure${String(n) === '1' ? '' : 's'}`);
  if (loose.limitedBy) parts.push(`limited by the ${loose.limitedBy}`);
  return { main: `${s.value} ${unit}`, note: parts.join(', ') || undefined };
}

/** Decimals the reading is shown with: as many as the typed reading has, else a semi-micro balance's 0.01 mg. */
export function readingDecimals(unit: string, typed: string | undefined): number {
  if (typed && /\./.test(typed)) return typed.split('.')[1]!.replace(/[eE].*$/, '').length;
  return unit === 'g' ? 5 : 2;
}

export function ResultsPanel({ live, readingTyped }: { live: LiveResult; readingTyped: string }) {
  if (live.status !== 'ok') {
    const entries = Object.entries(live.fields);
    return (
      <div data-testid="results-blocked" className="rounded-xl border-2 border-bad-700 bg-card p-5" role="status">
        <p className="text-lg font-bold text-bad-700">No result yet</p>
        <p className="mt-1">Results appear as soon as the highlighted inputs are fixed:</p>
        <ul className="mt-2 list-disc space-y-1 pl-6">
          {entries.map(([field, msg]) => (
            <li key={field}>
              <a href={`#${fieldId(field)}`} className="font-semibold text-brass-600 underline underline-offset-2">
                {FIELD_LABELS[field as FormField] ?? field}
              </a>
              : {msg}
            </li>
          ))}
          {live.general.map((g) => (
            <li key={g}>{g}</li>
          ))}
        </ul>
      </div>
    );
  }
  return <Results result={live.result} readingTyped={readingTyped} />;
}

function Results({ result, readingTyped }: { result: PreparationView; readingTyped: string }) {
  const rUnit = result.balanceReading.unit;
  const places = readingDecimals(rUnit, readingTyped);
  const actual = result.actual;
  const sf = actual ? sigFigText(actual.concentration.significantFigures, actual.concentration.unit) : null;

  return (
    <div className="flex flex-col gap-4" data-testid="results">
      <div className="rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-3">
        <p className="text-base font-bold text-ink">Reading to aim for</p>
        <p className="mt-1 flex flex-wrap items-baseline gap-x-3">
          <span data-testid="reading-to-aim" className="num text-5xl font-bold tracking-tight text-ink @sm:text-6xl">
            {fixed(result.balanceReading.value, places)}
          </span>
          <span className="text-2xl font-semibold">{rUnit}</span>
        </p>
        <p className="mt-1 text-sm text-ink-soft">
          Rounded to {places} decimal{places === 1 ? '' : 's'}; unrounded <span className="num">{sig(result.balanceReading.value, 10)}</span> {rUnit}.
        </p>
      </div>

      <dl className="grid gap-3 @sm:grid-cols-2">
        <Stat label="True mass needed" testId="true-mass" value={fixed(result.trueMass.value, places + 1)} unit={result.trueMass.unit} />
        <Stat
          label="Air density"
          testId="air-density"
          value={sig(result.airDensity.value, 5)}
          unit={result.airDensity.unit}
          hint={<>= {kgPerM3(result.airDensity.value)} kg/m³</>}
        />
        <Stat label="Gravimetric factor (analyte ÷ compound)" testId="gravimetric-factor" value={sig(result.gravimetricFactor, 6)} />
        <Stat label="Buoyancy factor (true mass ÷ reading)" testId="buoyancy-factor" value={fixed(result.buoyancyFactor, 7)} />
      </dl>

      {actual ? (
        <section aria-labelledby="actual-title" className="flex flex-col gap-3 rounded-xl border-2 border-slate-700 bg-card p-4">
          <h3 id="actual-title" className="text-lg font-bold">
            From your reading
          </h3>
          <dl className="grid gap-3 @sm:grid-cols-2">
            <Stat label="True mass weighed" testId="actual-true-mass" value={fixed(actual.trueMass.value, places + 1)} unit={actual.trueMass.unit} />
            <Stat
              label="Expanded uncertainty"
              testId="expanded-uncertainty"
              value={sig(actual.concentration.expandedUncertainty, 2)}
              unit={`${actual.concentration.unit} (k = ${actual.concentration.k})`}
              hint={
                <>
                  standard: <span className="num">{sig(actual.concentration.standardUncertainty, 3)}</span> {actual.concentration.unit}
                </>
              }
            />
          </dl>
          <div className="grid gap-3 @lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
            <div className="rounded-lg bg-slate-900 px-4 py-3 text-white">
              <p className="text-sm font-semibold text-slate-100">Concentration (GUM, rounded to its uncertainty)</p>
              <p data-testid="concentration-display" className="num mt-1 text-2xl font-bold">
                {actual.concentration.display}
              </p>
            </div>
            <div className="rounded-lg border-2 border-line px-4 py-3">
              <p className="text-sm font-semibold text-ink-soft">Classical significant figures</p>
              <p data-testid="concentration-sigfig" className="num mt-1 text-2xl font-semibold">
                {sf?.main ?? '—'}
              </p>
              {sf?.note ? <p className="text-sm text-ink-soft">{sf.note}</p> : null}
            </div>
          </div>
        </section>
      ) : (
        <div className="flex flex-col gap-3">
        {result.planned ? (
          <div className="rounded-lg border-2 border-line bg-card px-4 py-3">
            <p className="text-sm font-semibold text-ink-soft">Expected result if you weigh exactly this</p>
            <p data-testid="planned-display" className="num mt-1 text-xl font-semibold">
              {result.planned.expectedUncertainty.display}
            </p>
            <p className="text-sm text-ink-soft">Reading uncertainty: {result.planned.expectedUncertainty.readingUncertaintyBasis}.</p>
          </div>
        ) : null}
        <p className="rounded-lg border-2 border-dashed border-line bg-card px-4 py-3 text-ink-soft" data-testid="awaiting-reading">
          Enter the balance reading under <a href="#weighing-reading-value" className="font-semibold text-brass-600 underline">Weighing</a> to get the
          concentration, its uncertainty and the budget.
        </p>
        </div>
      )}
    </div>
  );
}
