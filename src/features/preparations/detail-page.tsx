import type { ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { BudgetTable } from '../calculate/components/budget-table.tsx';
import { fixed, sig } from '../calculate/format-result.ts';
import { preparationQueries } from './api/preparation-queries.ts';
import { BudgetChart } from './components/budget-chart.tsx';
import { ResultSummary } from './components/result-summary.tsx';
import { StageBadge } from './components/stage-badge.tsx';
import { WeighingList } from './components/weighing-list.tsx';
import { balanceDecimals, calcVersionName, expiryReasonText, formatLabTime, qty, statusLabel } from './format.ts';
import type { MakeUp, PreparationDetail } from './types.ts';
import { calibratedVolumeLine, calibratedVolumeShown } from '../../../shared/prep/calibrated-volume.ts';
import { SignActions } from '../signatures/components/sign-actions.tsx';
import { DilutionActions, DilutionPlanPanel, LineagePanel, isDilution } from '../lineage/components/lineage-section.tsx';
import { GravimetricPanel, isGravimetric } from '../lineage/components/gravimetric-bench.tsx';
import { SignaturesPanel } from '../signatures/components/signatures-panel.tsx';
import { MixAction, MixInputs, MixPanel, isMix } from '../mixes/components/mix-panel.tsx';
import { AmendedMarker, ReviewFlagBanner, SealBrokenBanner, StatusBadge, StatusExplainer, VersionTag } from '../signatures/components/status-badge.tsx';
import { ExpiredBanner, ExpiryPanel } from '../expiry/components/expiry-panel.tsx';
import { HazardCautions } from './components/hazard-cautions.tsx';

function Facts({ rows, testId }: { rows: [string, ReactNode][]; testId?: string }) {
  return (
    <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid={testId}>
      {rows.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="font-semibold text-ink-soft">{k}</dt>
          <dd className="num min-w-0 break-words">{v ?? '—'}</dd>
        </div>
      ))}
    </dl>
  );
}

function MakeUpFacts({ m, tz }: { m: MakeUp; tz?: string }) {
  return (
    <Facts
      rows={[
        ['Flask', `${m.flask.identifier} (${m.flask.snapshot.nominalVolumeMl} mL, class ${m.flask.snapshot.class})${m.flask.substituted ? ' — used instead of the planned flask' : ''}`],
        ...(m.flask.snapshot.calibratedVolume
          ? ([['Calibrated volume', <span data-testid="make-up-calibrated-volume">{calibratedVolumeLine(m.flask.identifier, m.flask.snapshot.calibratedVolume)}</span>]] as [string, ReactNode][])
          : []),
        ['Solvent', `${m.solvent.name}, lot ${m.solvent.lot}`],
        ['Solution temperature', `${m.solutionTemperatureC} °C`],
        ['Temperature correction', m.applyTemperatureCorrection ? 'applied (to 20 °C)' : 'not applied'],
        ...(m.correctionReason ? ([['Reason for the new make-up', m.correctionReason]] as [string, ReactNode][]) : []),
        ['Recorded', `${m.recordedBy.fullName}, ${formatLabTime(m.recordedAt, tz)}`],
      ]}
    />
  );
}

/** The optional audit trail component, if the audit feature is present in this build. */
const trailModules = import.meta.glob<{ RecordTrail?: (p: { entity: string; entityId: number }) => ReactNode }>('../audit/components/record-trail.tsx', { eager: true });
const RecordTrail = Object.values(trailModules)[0]?.RecordTrail;

function Snapshot({ d }: { d: PreparationDetail }) {
  const m = d.snapshot.material;
  const b = d.snapshot.balance;
  const f = d.snapshot.flask;
  const c = d.conditionsUsed;
  return (
    <div className="grid gap-6 lg:grid-cols-3">
      <div>
        <h3 className="mb-2 text-lg font-bold">Reference material</h3>
        <Facts
          testId="snapshot-material"
          rows={[
            ['Name', <span className="font-sans">{m.name}</span>],
            ['Formula', m.formula],
            ['Lot', m.lot],
            ['Certificate', m.certificateNumber ?? '—'],
            ['Purity', `${m.purity.value}${m.purity.expandedUncertainty ? ` ± ${m.purity.expandedUncertainty} (k = ${m.purity.k ?? '2'})` : m.purity.standardUncertainty ? ` (u = ${m.purity.standardUncertainty})` : ''}`],
            ['Density', m.densityGPerMl ? `${m.densityGPerMl} g/mL` : 'not recorded'],
            ['Expires', m.expiresOn ?? 'not recorded'],
          ]}
        />
      </div>
      <div>
        <h3 className="mb-2 text-lg font-bold">Balance (at planning)</h3>
        <Facts
          testId="snapshot-balance"
          rows={[
            ['Balance', b.identifier],
            ['Readability d', `${b.readabilityMg} mg`],
            ['Minimum weight', b.minWeightMg ? `${b.minWeightMg} mg` : 'not recorded'],
            ['Calibration due', b.calibrationDueOn ?? 'not recorded'],
            ['Weight density', `${b.weightDensityGPerMl} g/mL`],
          ]}
        />
      </div>
      <div>
        <h3 className="mb-2 text-lg font-bold">Volume and conditions</h3>
        <Facts
          testId="snapshot-flask"
          rows={[
            ['Flask', f ? `${f.identifier}, ${f.nominalVolumeMl} mL class ${f.class}${f.toleranceMl ? ` ± ${f.toleranceMl} mL` : ''}` : `free volume ${qty(d.volume)}`],
            ...(f?.calibratedVolume ? ([['Calibrated volume (plan)', calibratedVolumeLine(f.identifier, f.calibratedVolume)]] as [string, ReactNode][]) : []),
            ['Target', qty(d.target)],
            ['Analyte', d.analyteFormula],
            ['Conditions', `${c.temperatureC} °C, ${c.pressureHPa} hPa, ${c.relativeHumidityPct} % RH${c.source === 'lab-default' ? ' (lab defaults)' : ''}`],
          ]}
        />
      </div>
    </div>
  );
}

/**
 * The whole record. With `verification`, the same page is the verifier's workspace: no bench or signing
 * buttons at the top, and the given checklist panel after the audit trail.
 */
export function DetailPage({ verification }: { verification?: (d: PreparationDetail) => ReactNode } = {}) {
  const { identifier = '' } = useParams();
  const auth = useAuth();
  const detail = useQuery(preparationQueries.detail(identifier));
  const settings = useQuery(settingsQueries.detail());

  if (detail.isPending) return <Spinner label="Loading the preparation…" />;
  if (detail.isError) {
    return (
      <Banner title={detail.error.status === 404 ? `No preparation ${identifier}` : 'The preparation could not be loaded'}>
        {detail.error.message}{' '}
        <Link to="/preparations" className="font-semibold underline">
          Back to the list
        </Link>
      </Banner>
    );
  }
  const d = detail.data;
  const tz = settings.data?.timeZone;
  const canBench = auth.status === 'signed-in' && (auth.user.role === 'chemist' || auth.user.role === 'technician');
  const canOpenPrint = auth.status === 'signed-in' && ['chemist', 'technician', 'qa'].includes(auth.user.role);
  const decimals = balanceDecimals(d.snapshot.balance.readabilityMg) ?? 2;
  const airDensity = d.plan.airDensity;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={
          <span className="flex flex-wrap items-center gap-3">
            <span className="num" data-testid="detail-identifier">
              {d.identifier}
            </span>
            <StageBadge stage={d.stage} testId="detail-stage" />
            <StatusBadge status={d.status} testId="detail-status" />
            <VersionTag version={d.version} />
            <AmendedMarker d={d} />
          </span>
        }
      >
        <StatusExplainer d={d} />
        <p>
          {d.materialName} as <span className="num">{d.analyteFormula}</span> · planned by {d.createdBy.fullName}, {formatLabTime(d.createdAt, tz)}
        </p>
        <p data-testid="detail-expiry">
          Expires <span className="num font-semibold text-ink">{d.expiry.expiresOn}</span>
          {d.expiry.reason ? ` — ${expiryReasonText(d.expiry.reason, d.stage !== 'complete')}` : ''}
        </p>
      </PageHeader>

      <SealBrokenBanner d={d} />
      <ReviewFlagBanner d={d} timeZone={tz} />
      <ExpiredBanner d={d} />

      {!verification ? <SignActions d={d} /> : null}

      {canBench && !verification ? (
        <div>
          <Link
            to={`/preparations/${encodeURIComponent(d.identifier)}/bench`}
            data-testid="open-bench"
            className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-6 text-lg font-semibold text-white hover:bg-slate-900"
          >
            Open the bench view
          </Link>
        </div>
      ) : null}

      {!verification ? <DilutionActions d={d} /> : null}
      {!verification ? <MixAction d={d} /> : null}

      {canOpenPrint ? (
        <div>
          <Link
            to={`/preparations/${encodeURIComponent(d.identifier)}/print`}
            data-testid="open-print"
            className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 text-lg font-semibold hover:bg-slate-100"
          >
            {canBench ? 'Print: prep sheet and labels' : 'Print the prep sheet'}
          </Link>
        </div>
      ) : null}

      {d.result ? (
        <Panel title="Result" id="detail-result">
          <ResultSummary result={d.result} />
          <p className="mt-3 text-sm text-ink-soft">
            Computed {formatLabTime(d.result.computedAt, tz)} ({calcVersionName(d.result.calcVersion)}) from weighing #{d.result.basedOn.weighingId}
            {d.result.basedOn.makeUpId ? ` and make-up #${d.result.basedOn.makeUpId}` : ''}; volume{' '}
            {d.makeUp?.flask.snapshot.calibratedVolume
              ? `${calibratedVolumeShown(d.makeUp.flask.snapshot.calibratedVolume)} mL at 20 °C (calibrated, ${d.makeUp.flask.snapshot.calibratedVolume.checkIdentifier})`
              : qty(d.result.volume)}
            .
          </p>
        </Panel>
      ) : isMix(d) ? (
        <MixPanel d={d} />
      ) : isGravimetric(d) ? (
        <GravimetricPanel d={d} />
      ) : isDilution(d) ? (
        <DilutionPlanPanel d={d} />
      ) : (
        <Panel title="Expected result" id="detail-expected">
          <p className="num text-2xl font-semibold" data-testid="detail-expected">
            {d.plan.expectedUncertainty.display}
          </p>
          <p className="text-ink-soft">The concentration is recomputed from the weighing and the make-up once they are recorded.</p>
        </Panel>
      )}

      <Panel title="Signatures" id="detail-signatures">
        <SignaturesPanel signatures={d.signatures} timeZone={tz} />
      </Panel>

      <Panel title="Expiry" id="detail-expiry-section">
        <ExpiryPanel d={d} timeZone={tz} />
      </Panel>

      {d.result && d.result.budget.length > 0 ? (
        <Panel title="Uncertainty budget" id="detail-budget">
          <div className="flex flex-col gap-6">
            <BudgetChart rows={d.result.budget} />
            <BudgetTable rows={d.result.budget} outputUnit={d.result.concentration.unit} />
          </div>
        </Panel>
      ) : null}

      {isDilution(d) || isMix(d) || isGravimetric(d) ? null : (
      <Panel title="Plan" id="detail-plan">
        <Facts
          testId="detail-plan-facts"
          rows={[
            ['Reading to aim for', `${fixed(d.plan.targetReading.value, decimals)} mg`],
            ['Acceptable window', `${d.plan.window.low} … ${d.plan.window.high} mg (± ${d.plan.window.pct} %)`],
            ['True mass', `${fixed(d.plan.trueMass.value, decimals + 1)} mg`],
            ['Buoyancy factor', fixed(d.plan.buoyancyFactor, 7)],
            ['Gravimetric factor', sig(d.plan.gravimetricFactor, 6)],
            ['Air density', `${sig(airDensity, 5)} g/mL`],
            ['Expected concentration', d.plan.expectedUncertainty.display],
          ]}
        />
        {d.notes ? <p className="mt-3">Notes: {d.notes}</p> : null}
      </Panel>
      )}

      <Panel title="Lineage" id="detail-lineage">
        <LineagePanel d={d} />
      </Panel>

      <Panel title="Inputs as frozen at planning" id="detail-snapshot">
        {isMix(d) ? <MixInputs d={d} /> : <Snapshot d={d} />}
      </Panel>

      <Panel title="Weighings" id="detail-weighings">
        <WeighingList weighings={d.weighings} timeZone={tz} />
      </Panel>

      <Panel title="Make-up to volume" id="detail-make-up">
        {d.makeUp ? <MakeUpFacts m={d.makeUp} tz={tz} /> : <p className="text-ink-soft">Not made up yet.</p>}
        {d.makeUpHistory.filter((m) => m.id !== d.makeUp?.id).length > 0 ? (
          <details className="mt-4">
            <summary className="min-h-12 cursor-pointer py-3 font-semibold">Earlier make-ups</summary>
            <div className="flex flex-col gap-4">
              {d.makeUpHistory
                .filter((m) => m.id !== d.makeUp?.id)
                .map((m) => (
                  <div key={m.id} className="rounded-lg border-2 border-line p-3 opacity-80">
                    <MakeUpFacts m={m} tz={tz} />
                  </div>
                ))}
            </div>
          </details>
        ) : null}
      </Panel>

      <Panel title="Hazards" id="detail-hazards">
        <HazardCautions hazards={d.hazards} testId="hazard-cautions" />
      </Panel>

      <Panel title="Status history" id="detail-history">
        <ol className="flex flex-col gap-2" data-testid="status-history">
          {d.statusHistory.map((s, i) => (
            <li key={`${s.status}-${i}`} className="flex flex-wrap gap-x-3">
              <span className="font-semibold">{statusLabel(s.status)}</span>
              <span className="text-ink-soft">
                {s.by.fullName}, {formatLabTime(s.at, tz)}
              </span>
              {s.note ? <span>— {s.note}</span> : null}
            </li>
          ))}
        </ol>
      </Panel>

      {RecordTrail ? (
        <Panel title="Audit trail" id="detail-audit">
          <RecordTrail entity="preparation" entityId={d.id} />
        </Panel>
      ) : null}

      {verification ? (
        <Panel title="Verification" id="detail-verification">
          {verification(d)}
        </Panel>
      ) : null}
    </div>
  );
}
