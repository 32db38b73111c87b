import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import { Banner, Panel, Spinner } from '../../../components/ui/feedback.tsx';
import { useAuth } from '../../auth/use-auth.ts';
import { volumeCheckQueries } from '../api/volume-check-queries.ts';
import { CALIBRATION_TEXT, isCheckable, uncertaintyText, valueAtUncertainty } from '../format.ts';
import { CalibrationBadge, VerdictBadge } from './check-badges.tsx';

const linkClass = 'inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 px-4 font-semibold hover:bg-slate-100';

/**
 * On a volumetric ware item's inventory page: its calibration status from the latest verified gravimetric check
 * (GET /api/volumetric-ware/:id/calibration), the next due date, the last check, and the ways to its checks and
 * to planning a new one (chemist, technician; checkable kinds only).
 */
export function WareCalibrationPanel({ wareId, kind, retired }: { wareId: number; kind: string; retired: boolean }) {
  const auth = useAuth();
  const cal = useQuery(volumeCheckQueries.calibration(wareId));
  const canPlan = auth.status === 'signed-in' && (auth.user.role === 'chemist' || auth.user.role === 'technician') && isCheckable(kind) && !retired;
  return (
    <Panel title="Calibration (gravimetric check)" id="calibration">
      {cal.isPending ? (
        <Spinner label="Loading the calibration status…" />
      ) : cal.isError ? (
        <Banner title="The calibration status could not be loaded">{cal.error.message}</Banner>
      ) : (
        <div className="flex flex-col gap-4" data-testid="ware-calibration">
          <p className="flex flex-wrap items-center gap-3 text-lg">
            <CalibrationBadge status={cal.data.status} testId="ware-calibration-status" />
            <span className="text-ink-soft">{CALIBRATION_TEXT[cal.data.status].hint}</span>
          </p>
          {cal.data.check ? (
            <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-3">
              <div>
                <dt className="text-sm font-semibold text-ink-soft">Next check due</dt>
                <dd className="num text-2xl font-bold" data-testid="ware-next-due">
                  {cal.data.check.nextDueOn ?? '—'}
                </dd>
              </div>
              <div>
                <dt className="text-sm font-semibold text-ink-soft">Last verified check</dt>
                <dd className="flex flex-wrap items-center gap-2 text-lg">
                  <Link to={`/glassware/${encodeURIComponent(cal.data.check.identifier)}`} className="num font-semibold text-brass-600 underline underline-offset-4" data-testid="ware-last-check">
                    {cal.data.check.identifier}
                  </Link>
                  <VerdictBadge verdict={cal.data.check.verdict} />
                </dd>
                <dd className="text-sm text-ink-soft">verified {cal.data.check.verifiedOn}</dd>
              </div>
              {cal.data.calibratedVolume ? (
                <div>
                  <dt className="text-sm font-semibold text-ink-soft">Calibrated volume at 20 °C</dt>
                  <dd className="num text-lg" data-testid="ware-calibrated-volume">
                    {valueAtUncertainty(cal.data.calibratedVolume.value, cal.data.calibratedVolume.expandedUncertainty)} ± {uncertaintyText(cal.data.calibratedVolume.expandedUncertainty)} {cal.data.calibratedVolume.unit}{' '}
                    <span className="font-sans text-sm text-ink-soft">(k = {cal.data.calibratedVolume.k})</span>
                  </dd>
                </div>
              ) : null}
            </dl>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <Link to={`/glassware?wareId=${wareId}`} className={linkClass} data-testid="ware-checks-link">
              Checks of this item
            </Link>
            {canPlan ? (
              <Link to={`/glassware/new?wareId=${wareId}`} className={`${linkClass} bg-slate-700 text-white hover:bg-slate-900`} data-testid="ware-plan-check">
                Plan a check
              </Link>
            ) : null}
          </div>
          {!isCheckable(kind) ? <p className="text-sm text-ink-soft">Gravimetric checks cover bulb and piston pipettes, volumetric flasks and burettes.</p> : null}
        </div>
      )}
    </Panel>
  );
}
