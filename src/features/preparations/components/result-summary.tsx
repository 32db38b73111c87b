import { fixed, sig } from '../../calculate/format-result.ts';
import type { Result } from '../types.ts';

const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** "1.000e+3" → "1.000 × 10³": keeps the written digits (the point of the significant-figure view). */
export function powerOfTen(s: string): string {
  const m = /^([+-]?\d+(?:\.\d+)?)[eE]\+?(-?\d+)$/.exec(s.trim());
  if (!m) return s;
  return `${m[1]} × 10${[...m[2]!].map((ch) => SUP[ch] ?? ch).join('')}`;
}

/** The recomputed concentration: GUM display big, the classical significant-figure view beside it. */
export function ResultSummary({ result, compact = false }: { result: Result; compact?: boolean }) {
  const c = result.concentration;
  const sf = c.significantFigures;
  return (
    <div className="flex flex-col gap-3" data-testid="result-summary">
      <div className="grid gap-3 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="rounded-xl bg-slate-900 px-5 py-4 text-white">
          <p className="text-sm font-semibold text-slate-100">Concentration (rounded to its uncertainty, GUM)</p>
          <p data-testid="result-display" className={`num mt-1 font-bold ${compact ? 'text-2xl sm:text-3xl' : 'text-3xl'}`}>
            {c.display}
          </p>
        </div>
        <div className="rounded-xl border-2 border-line bg-card px-5 py-4">
          <p className="text-sm font-semibold text-ink-soft">Classical significant figures</p>
          <p data-testid="result-sigfig" className="num mt-1 text-2xl font-semibold">
            {sf ? `${powerOfTen(sf.value)} ${c.unit}` : '—'}
          </p>
          {sf ? (
            <p className="text-sm text-ink-soft">
              {sf.significantFigures} significant figure{sf.significantFigures === 1 ? '' : 's'}, limited by the {sf.limitedBy}
            </p>
          ) : null}
        </div>
      </div>
      <dl className="grid gap-3 sm:grid-cols-3">
        <div className="rounded-lg border-2 border-line bg-card px-3 py-2">
          <dt className="text-sm font-semibold text-ink-soft">Standard uncertainty</dt>
          <dd className="num mt-1 text-xl font-semibold" data-testid="result-u">
            {sig(c.standardUncertainty, 3)} <span className="font-sans text-base text-ink-soft">{c.unit}</span>
          </dd>
        </div>
        <div className="rounded-lg border-2 border-line bg-card px-3 py-2">
          <dt className="text-sm font-semibold text-ink-soft">Expanded uncertainty (k = {c.k})</dt>
          <dd className="num mt-1 text-xl font-semibold">
            {sig(c.expandedUncertainty, 2)} <span className="font-sans text-base text-ink-soft">{c.unit}</span>
          </dd>
        </div>
        <div className="rounded-lg border-2 border-line bg-card px-3 py-2">
          <dt className="text-sm font-semibold text-ink-soft">True mass (buoyancy-corrected)</dt>
          <dd className="num mt-1 text-xl font-semibold" data-testid="result-true-mass">
            {fixed(result.trueMass.value, 3)} <span className="font-sans text-base text-ink-soft">{result.trueMass.unit}</span>
          </dd>
        </div>
      </dl>
      {result.temperatureCorrection ? (
        <p className="text-sm text-ink-soft">
          Corrected to 20 °C from {result.temperatureCorrection.temperatureC} °C (factor <span className="num">{sig(result.temperatureCorrection.factor, 7)}</span>).
        </p>
      ) : null}
    </div>
  );
}
