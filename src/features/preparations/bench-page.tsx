import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { fixed } from '../calculate/format-result.ts';
import { preparationQueries } from './api/preparation-queries.ts';
import { MakeUpForm } from './components/make-up-form.tsx';
import { ResultSummary } from './components/result-summary.tsx';
import { StageBadge } from './components/stage-badge.tsx';
import { WeighingForm } from './components/weighing-form.tsx';
import { WeighingList } from './components/weighing-list.tsx';
import { balanceDecimals, formatLabTime } from './format.ts';
import type { Weighing } from './types.ts';
import { AmendedMarker, ReviewFlagBanner, SealBrokenBanner, StatusBadge } from '../signatures/components/status-badge.tsx';
import { isDilution } from '../lineage/components/lineage-section.tsx';
import { DilutionBench } from '../lineage/components/dilution-bench.tsx';
import { GravimetricBench, isGravimetric } from '../lineage/components/gravimetric-bench.tsx';
import { MixBench } from '../mixes/components/mix-bench.tsx';
import { isMix, mixOf } from '../mixes/components/mix-panel.tsx';
import { shownEstimate } from '../../../shared/calc/rounding.ts';
import { HazardCautions } from './components/hazard-cautions.tsx';

/** The bench view: target and window huge, then record the weighing and the make-up. Glove-sized targets. */
export function BenchPage() {
  const { identifier = '' } = useParams();
  const detail = useQuery(preparationQueries.detail(identifier));
  const settings = useQuery(settingsQueries.detail());
  const [correcting, setCorrecting] = useState<Weighing | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [makeUpAgain, setMakeUpAgain] = useState(false);

  if (detail.isPending) return <Spinner label="Loading the preparation…" />;
  if (detail.isError) {
    return (
      <Banner title={detail.error.status === 404 ? `No preparation ${identifier}` : 'The preparation could not be loaded'}>
        {detail.error.message} <Link to="/preparations" className="font-semibold underline">Back to the list</Link>
      </Banner>
    );
  }
  const d = detail.data;
  const tz = settings.data?.timeZone;
  const balance = d.snapshot.balance;
  const decimals = balanceDecimals(balance?.readabilityMg) ?? 2;
  const current = d.weighings.filter((w) => !w.supersededById);
  const latest = current[current.length - 1];
  // A volumetric dilution has no weighing: the aliquot, make-up and result panels replace target and weighing.
  const dilution = isDilution(d) || isMix(d) || isGravimetric(d); // a mix has no weighing either (MixBench); a dilution by mass: GravimetricBench

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={
          <span className="flex flex-wrap items-center gap-3">
            <span className="num" data-testid="bench-identifier">
              {d.identifier}
            </span>
            <StageBadge stage={d.stage} testId="bench-stage" />
            <StatusBadge status={d.status} testId="bench-status" />
            <AmendedMarker d={d} testId="bench-amended" />
          </span>
        }
      >
        {mixOf(d) ? (
          <MixTargets d={d} />
        ) : (
          <>
            {d.materialName} as <span className="num">{d.analyteFormula}</span>, target{' '}
            <span className="num">
              {d.target.value} {d.target.unit}
            </span>
          </>
        )}{' '}
        in{' '}
        <span className="num">
          {d.volume.value} {d.volume.unit}
        </span>
        . <Link to={`/preparations/${encodeURIComponent(d.identifier)}`} className="font-semibold text-brass-600 underline underline-offset-2" data-testid="bench-to-detail">Open the full record</Link>
      </PageHeader>

      {dilution ? null : (
      <section aria-label="Target" className="grid gap-4 rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-5 md:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div>
          <p className="text-lg font-bold">Reading to aim for</p>
          <p className="flex flex-wrap items-baseline gap-x-3">
            <span data-testid="bench-target" className="num text-7xl font-bold tracking-tight">
              {fixed(d.plan.targetReading.value, decimals)}
            </span>
            <span className="text-3xl font-semibold">mg</span>
          </p>
          <p className="mt-2 text-xl">
            Window ± {d.plan.window.pct} %:{' '}
            <span className="whitespace-nowrap">
              <span data-testid="bench-window" className="num text-3xl font-bold">
                {d.plan.window.low} … {d.plan.window.high}
              </span>{' '}
              mg
            </span>
          </p>
        </div>
        <dl className="flex flex-col gap-2 text-lg">
          <div>
            <dt className="text-sm font-semibold text-ink-soft">Balance to use</dt>
            <dd className="num text-3xl font-bold" data-testid="bench-balance">
              {balance.identifier}
            </dd>
            <dd className="text-base">
              reads to {balance.readabilityMg} mg{balance.minWeightMg ? ` · minimum weight ${balance.minWeightMg} mg` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-sm font-semibold text-ink-soft">Flask</dt>
            <dd className="num text-xl font-semibold">{d.snapshot.flask ? `${d.snapshot.flask.identifier} (${d.snapshot.flask.nominalVolumeMl} mL)` : `${d.volume.value} ${d.volume.unit}`}</dd>
          </div>
        </dl>
      </section>
      )}

      {dilution ? null : <HazardCautions hazards={d.hazards} testId="bench-cautions" showCodes={false} />}

      <SealBrokenBanner d={d} />
      <ReviewFlagBanner d={d} timeZone={tz} />

      {dilution ? <DilutionBench d={d} timeZone={tz} /> : null}
      {isMix(d) ? <MixBench d={d} timeZone={tz} /> : null}
      {isGravimetric(d) ? <GravimetricBench d={d} timeZone={tz} /> : null}

      {saved ? (
        <Banner tone="ok" title="Saved" testId="bench-saved">
          {saved}
        </Banner>
      ) : null}

      {d.result ? (
        <Panel title="Concentration from the record so far" id="bench-result">
          <ResultSummary result={d.result} compact />
        </Panel>
      ) : null}

      {dilution ? null : (
      <div className="grid items-start gap-6 xl:grid-cols-2">
        <Panel title={correcting ? `Correct weighing #${correcting.id}` : 'Weigh'} id="bench-weigh">
          <WeighingForm
            key={correcting?.id ?? 'new'}
            detail={d}
            correcting={correcting}
            defaults={settings.data?.defaultRoomConditions}
            onCancelCorrection={() => setCorrecting(null)}
            onDone={(next) => {
              const w = next.weighings[next.weighings.length - 1];
              setCorrecting(null);
              setSaved(
                `Weighing #${w?.id ?? ''} stored: net ${w?.net.value ?? ''} mg${w && !w.inWindow ? ' (outside the window, reason recorded)' : ''}.` +
                  (next.result ? ` Concentration now ${next.result.concentration.display}.` : ''),
              );
            }}
          />
        </Panel>
        <div className="flex flex-col gap-6">
          <Panel title="Weighings" id="bench-weighings">
            <WeighingList weighings={d.weighings} timeZone={tz} onCorrect={(w) => setCorrecting(w)} />
          </Panel>
          <Panel title="Make up to volume" id="bench-make-up">
            {d.makeUp ? (
              <p className="mb-4 rounded-lg border-2 border-ok-700 bg-ok-50 px-4 py-3" data-testid="make-up-done">
                Made up in <span className="num font-semibold">{d.makeUp.flask.identifier}</span> with {d.makeUp.solvent.name} (lot{' '}
                <span className="num">{d.makeUp.solvent.lot}</span>) at <span className="num">{d.makeUp.solutionTemperatureC} °C</span> by{' '}
                {d.makeUp.recordedBy.fullName}, {formatLabTime(d.makeUp.recordedAt, tz)}.
              </p>
            ) : null}
            {d.makeUp && !makeUpAgain ? (
              <Button variant="secondary" data-testid="make-up-again" onClick={() => setMakeUpAgain(true)}>
                Make up again (with a reason)
              </Button>
            ) : latest || d.makeUp ? (
              <MakeUpForm
                detail={d}
                onDone={(next) => {
                  setMakeUpAgain(false);
                  setSaved(`Make-up stored.${next.result ? ` Concentration now ${next.result.concentration.display}.` : ''}`);
                }}
              />
            ) : (
              <p className="text-ink-soft">Record the weighing first.</p>
            )}
          </Panel>
        </div>
      </div>
      )}
    </div>
  );
}

/** A mix has one target per analyte (each component's planned concentration), never only the first one's. */
export function MixTargets({ d }: { d: Parameters<typeof mixOf>[0] }) {
  const mix = mixOf(d)!;
  return (
    <span data-testid="bench-mix-targets">
      Mix of {mix.components.length} analytes, targets{' '}
      {mix.components.map((c, i) => (
        <span key={c.linkId}>
          {i > 0 ? (i === mix.components.length - 1 ? ' and ' : ', ') : ''}
          <span className="num font-semibold" data-testid={`bench-mix-target-${c.analyteFormula}`}>
            {c.analyteFormula} {shownEstimate(c.planned.value, c.planned.standardUncertainty, c.planned.k)} {c.planned.unit}
          </span>{' '}
          (from <span className="num">{c.parent.identifier}</span>)
        </span>
      ))}
    </span>
  );
}
