import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { NotFound } from '../../components/errors/not-found.tsx';
import { ApiError } from '../../lib/api-client.ts';
import { formatDateTime } from '../../lib/format.ts';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { VersionTag } from '../signatures/components/status-badge.tsx';
import { volumeCheckQueries } from './api/volume-check-queries.ts';
import { BenchPanel } from './components/bench-panel.tsx';
import { CheckSigning } from './components/check-signing.tsx';
import { CheckStatusBadge, VerdictBadge } from './components/check-badges.tsx';
import { ResultPanel } from './components/result-panel.tsx';
import { CHECK_KIND_LABELS, MATERIAL_LABELS, displayStatus, methodText, progress } from './format.ts';
import type { VolumeCheckDetail } from './types.ts';

function PlanSummary({ d }: { d: VolumeCheckDetail }) {
  const c = d.conditions;
  const rows: Array<[string, string]> = [
    ['Ware', `${d.ware.identifier} — ${CHECK_KIND_LABELS[d.ware.kind] ?? d.ware.kind} ${d.ware.nominalVolumeMl} mL${d.plan.class ? ` class ${d.plan.class}` : ''}`],
    ['Material', MATERIAL_LABELS[d.plan.material] ?? d.plan.material],
    ['Mode', d.plan.mode === 'delivery' ? 'Delivery (Ex)' : 'Content (In)'],
    ['Tested volumes', d.plan.tested.map((t) => `${t.value} ${t.unit} × ${t.replicates}`).join(', ')],
    ['Balance', `${d.balance.identifier} (reads to ${d.balance.readabilityMg} mg)`],
    ['Water', `${c.waterTemperatureC} °C, ${c.waterAirSaturated ? 'air-saturated' : 'air-free'}`],
    ['Air', `${c.air.temperatureC} °C, ${c.air.pressureHPa} hPa, ${c.air.relativeHumidityPct} % RH`],
    ['Evaporation per replicate', c.evaporation ? `${c.evaporation.value} ${c.evaporation.unit}` : 'not applied'],
    ['Check again after', `${d.plan.intervalMonths} months`],
    ['Planned by', `${d.createdBy.fullName}, ${formatDateTime(d.createdAt)}`],
  ];
  return (
    <Panel title="Plan" id="plan">
      <p className="mb-3 text-ink-soft">{methodText(d.plan.kind)}.</p>
      <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-2">
        {rows.map(([k, v]) => (
          <div key={k} className="min-w-0">
            <dt className="text-sm font-semibold text-ink-soft">{k}</dt>
            <dd className="num text-lg [overflow-wrap:anywhere]">{v}</dd>
          </div>
        ))}
      </dl>
      {d.gates.length ? (
        <ul className="mt-4 flex flex-col gap-1 text-sm" data-testid="check-gates">
          {d.gates.map((g) => (
            <li key={g.code}>
              <span className="font-semibold">{g.pass ? 'Passed' : 'Failed'}:</span> {g.message}
            </li>
          ))}
        </ul>
      ) : null}
      {d.notes ? <p className="mt-3">Notes: {d.notes}</p> : null}
    </Panel>
  );
}

/** /glassware/:identifier: one check — the plan, the bench (while planned), the result, and its signatures. */
export function CheckPage() {
  const { identifier = '' } = useParams();
  const auth = useAuth();
  const q = useQuery(volumeCheckQueries.detail(identifier));
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;
  if (q.isError && q.error instanceof ApiError && q.error.status === 404) return <NotFound />;
  if (q.isError) return <Banner title="Could not load this check">{q.error.message}</Banner>;
  if (!q.data) return <Spinner label="Loading the check…" />;
  const d = q.data;
  const shown = displayStatus(d);
  const canRecord = d.status === 'planned' && auth.status === 'signed-in' && (auth.user.role === 'chemist' || auth.user.role === 'technician');
  const p = progress(d);
  const returned = shown === 'returned' ? d.signatures[d.signatures.length - 1] : null;
  const failed = d.result?.verdict === 'fail';

  return (
    <div className="flex min-w-0 flex-col gap-5" data-testid="check-page">
      <div>
        <Link to={`/glassware?wareId=${d.ware.id}`} className="mb-3 inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4">
          ← Checks of {d.ware.identifier}
        </Link>
        <div className="flex flex-wrap items-start justify-between gap-4">
          <PageHeader title={<span className="num" data-testid="check-identifier">{d.identifier}</span>}>
            Gravimetric check of{' '}
            <Link to={`/inventory/volumetric-ware/${d.ware.id}`} className="font-semibold underline underline-offset-4" data-testid="check-ware-link">
              {d.ware.identifier}
            </Link>{' '}
            ({CHECK_KIND_LABELS[d.ware.kind] ?? d.ware.kind}, {d.ware.nominalVolumeMl} mL). <span className="num">{p.done} of {p.total}</span> readings recorded.
          </PageHeader>
          <div className="flex flex-wrap items-center gap-2">
            <CheckStatusBadge status={shown} testId="check-status" />
            <VerdictBadge verdict={d.result?.verdict} testId="check-verdict" />
            <VersionTag version={d.version} />
          </div>
        </div>
      </div>

      {returned ? (
        <div role="status" data-testid="check-returned" className="rounded-lg border-2 border-l-8 border-bad-700 bg-bad-50 px-4 py-3">
          <p className="font-bold">Returned by {returned.signer.fullName}</p>
          <p>{returned.reason}</p>
          <p className="mt-1 text-sm text-ink-soft">Correct the readings concerned (each with its reason), then a chemist signs the check as prepared again.</p>
        </div>
      ) : null}
      {failed && d.status === 'verified' ? (
        <div role="alert" data-testid="check-failed" className="rounded-lg border-2 border-l-8 border-bad-700 bg-bad-50 px-4 py-3 text-bad-700">
          <p className="text-lg font-bold">Failed: {d.ware.identifier} is outside its maximum permissible error</p>
          <p className="text-ink">It cannot be chosen for preparations until a new check passes. Take it out of use and label it as your local procedure requires.</p>
        </div>
      ) : failed ? (
        <Banner title="The result is outside the maximum permissible error">Check the readings and conditions before signing; a verified failed check blocks this item for preparations.</Banner>
      ) : null}

      <BenchPanel d={d} canRecord={canRecord} tz={tz} />
      <ResultPanel d={d} />
      <CheckSigning d={d} tz={tz} />
      <PlanSummary d={d} />
    </div>
  );
}
