import type { ReactNode } from 'react';
import { Panel } from '../../../components/ui/feedback.tsx';
import { sig } from '../../calculate/format-result.ts';
import { limitSource, percentText, testedLabel, uncertaintyText, volumeText } from '../format.ts';
import type { VolumeCheckDetail, VolumeCheckResponse } from '../types.ts';
import { VerdictBadge } from './check-badges.tsx';

function Stat({ label, children, testId }: { label: string; children: ReactNode; testId?: string }) {
  return (
    <div className="rounded-lg border-2 border-line px-3 py-2">
      <dt className="text-sm font-semibold text-ink-soft">{label}</dt>
      <dd className="num mt-1 text-xl font-semibold" data-testid={testId}>
        {children}
      </dd>
    </div>
  );
}

function TestedResult({ d, r, index }: { d: VolumeCheckDetail; r: VolumeCheckResponse; index: number }) {
  const rd = d.balance.readabilityMg;
  const u = r.mean.unit;
  return (
    <section className="flex flex-col gap-4" data-testid="tested-result" data-index={index}>
      <h3 className="flex flex-wrap items-center gap-3 text-lg font-bold">
        <span className="num">{testedLabel(d, index)}</span>
        <VerdictBadge verdict={r.verdict.result} testId={`tested-verdict-${index}`} />
        <span className="text-sm font-normal text-ink-soft">{r.method}</span>
      </h3>
      <dl className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
        <Stat label="Mean volume at 20 °C" testId={`result-mean-${index}`}>
          {volumeText(r.mean.value, rd)} {u}
        </Stat>
        <Stat label="Systematic error" testId={`result-systematic-${index}`}>
          {volumeText(r.systematicError.value, rd)} {u} ({percentText(r.systematicError.percent)} %)
        </Stat>
        <Stat label="Random error s (CV)" testId={`result-random-${index}`}>
          {volumeText(r.randomError.standardDeviation.value, rd)} {u} ({percentText(r.randomError.cvPercent)} %)
        </Stat>
        <Stat label={`Expanded uncertainty U (k = ${r.uncertainty.k})`} testId={`result-uncertainty-${index}`}>
          ± {uncertaintyText(r.uncertainty.expandedUncertainty)} {r.uncertainty.unit}
        </Stat>
      </dl>
      <div className={`rounded-lg border-2 border-l-8 px-4 py-3 ${r.verdict.result === 'pass' ? 'border-ok-700 bg-ok-50' : 'border-bad-700 bg-bad-50'}`} data-testid={`result-limit-${index}`}>
        <p className="font-bold">{r.verdict.result === 'pass' ? 'Within the maximum permissible error' : 'Outside the maximum permissible error'}</p>
        <ul className="mt-1">
          {r.verdict.checks.map((c) => (
            <li key={c.quantity} className="num">
              {c.quantity === 'systematic' ? 'Systematic error' : 'Random error (s)'}: {volumeText(c.measured, rd)} {c.unit} against {c.quantity === 'systematic' ? '±' : '≤'} {c.limit} {c.unit} — {c.pass ? 'pass' : 'fail'}
            </li>
          ))}
        </ul>
        <p className="mt-1 text-sm" data-testid={`result-limit-source-${index}`}>
          Limit: {limitSource(r.verdict.limit)}
        </p>
        <p className="mt-1 text-sm text-ink-soft">{r.verdict.decisionRule}.</p>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[28rem] text-left" data-testid={`result-replicates-${index}`}>
          <thead className="border-b-2 border-line text-sm">
            <tr>
              <th scope="col" className="py-2 pr-4">Replicate</th>
              <th scope="col" className="py-2 pr-4">Reading as shown</th>
              <th scope="col" className="py-2 pr-4">Volume at 20 °C</th>
            </tr>
          </thead>
          <tbody>
            {r.replicates.map((x) => (
              <tr key={x.index} className="border-b border-line last:border-0">
                <td className="py-1 pr-4">{x.index}</td>
                <td className="num py-1 pr-4">
                  {x.reading.value} {x.reading.unit}
                </td>
                <td className="num py-1 pr-4">
                  {volumeText(x.volume.value, rd)} {x.volume.unit}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-sm text-ink-soft">
        Water density {sig(r.waterDensity.value, 7)} g/mL at {r.waterDensity.temperatureC} °C ({r.waterDensity.source}); air density {sig(r.airDensity.value, 5)} g/mL ({r.airDensity.method});
        weights {r.weightDensity.value} g/mL; Z {sig(r.zFactor.value, 6)} mL/g; expansion coefficient {sig(r.expansionCoefficient.value, 3)} K⁻¹. Calculation {r.calcVersion}.
      </p>
    </section>
  );
}

/** The stored result (computed by the server when the last replicate came in): per tested volume, with the verdict and its limit. */
export function ResultPanel({ d }: { d: VolumeCheckDetail }) {
  if (!d.result) {
    return (
      <Panel title="Result" id="result">
        <p className="text-ink-soft" data-testid="result-pending">
          The result appears when every replicate is recorded.
        </p>
      </Panel>
    );
  }
  return (
    <Panel title="Result" id="result">
      <div className="flex flex-col gap-6" data-testid="result-panel">
        <p className="flex flex-wrap items-center gap-3 text-lg">
          Overall: <VerdictBadge verdict={d.result.verdict} testId="result-verdict" />
        </p>
        {d.result.tested.map((r, i) => (
          <TestedResult key={i} d={d} r={r} index={i} />
        ))}
      </div>
    </Panel>
  );
}
