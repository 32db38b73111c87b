import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { Banner, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import { formatDateTime } from '../../lib/format.ts';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { checkPickerQueries, volumeCheckQueries } from './api/volume-check-queries.ts';
import { CheckStatusBadge, VerdictBadge } from './components/check-badges.tsx';
import { CHECK_KIND_LABELS, isCheckable } from './format.ts';

/** /glassware: gravimetric checks of volumetric ware, newest first, filtered by ware item (?wareId=). */
export function GlasswareListPage() {
  const auth = useAuth();
  const [params, setParams] = useSearchParams();
  const raw = params.get('wareId') ?? '';
  const wareId = /^[1-9]\d{0,8}$/.test(raw) ? Number(raw) : null;
  const list = useQuery(volumeCheckQueries.list(wareId));
  const ware = useQuery(checkPickerQueries.ware());
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;
  const canPlan = auth.status === 'signed-in' && (auth.user.role === 'chemist' || auth.user.role === 'technician');
  const checkable = (ware.data ?? []).filter((w) => isCheckable(w.kind));
  const kindOf = new Map((ware.data ?? []).map((w) => [w.id, w.kind]));

  return (
    <div className="flex min-w-0 flex-col gap-5" data-testid="glassware-list">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <PageHeader title="Glassware checks">
          Pipettes, flasks and burettes checked by weighing the water they deliver or contain (ISO 4787 for glass, ISO 8655-6 for piston pipettes).
          The ware&apos;s calibration status follows from its latest verified check.
        </PageHeader>
        {canPlan ? (
          <Link
            to={wareId ? `/glassware/new?wareId=${wareId}` : '/glassware/new'}
            data-testid="plan-check-link"
            className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-6 text-lg font-semibold text-white hover:bg-slate-900"
          >
            Plan a check
          </Link>
        ) : null}
      </div>

      <div className="max-w-md">
        <label htmlFor="ware-filter" className="mb-1 block text-sm font-semibold">
          Ware item
        </label>
        <select
          id="ware-filter"
          data-testid="ware-filter"
          className="field-input"
          value={wareId ? String(wareId) : ''}
          onChange={(e) => setParams(e.target.value ? { wareId: e.target.value } : {}, { replace: true })}
        >
          <option value="">All ware</option>
          {checkable.map((w) => (
            <option key={w.id} value={String(w.id)}>
              {w.identifier} — {CHECK_KIND_LABELS[w.kind] ?? w.kind} {w.nominalVolumeMl} mL
            </option>
          ))}
        </select>
      </div>

      {list.isError ? (
        <Banner title="The checks could not be loaded">{list.error.message}</Banner>
      ) : !list.data ? (
        <Spinner label="Loading the checks…" />
      ) : list.data.length === 0 ? (
        <p className="rounded-xl border-2 border-dashed border-line bg-card px-5 py-6 text-ink-soft" data-testid="glassware-empty">
          No checks {wareId ? 'of this item ' : ''}yet.
        </p>
      ) : (
        <div className="overflow-x-auto rounded-xl border-2 border-line bg-card">
          <table className="w-full min-w-[40rem] text-left">
            <thead className="border-b-2 border-line bg-slate-100 text-sm">
              <tr>
                <th scope="col" className="px-4 py-3">Check</th>
                <th scope="col" className="px-4 py-3">Ware item</th>
                <th scope="col" className="px-4 py-3">Status</th>
                <th scope="col" className="px-4 py-3">Verdict</th>
                <th scope="col" className="px-4 py-3">Planned</th>
                <th scope="col" className="px-4 py-3">Next due</th>
              </tr>
            </thead>
            <tbody>
              {list.data.map((c) => (
                <tr key={c.id} className="border-b border-line last:border-0" data-testid="check-row" data-identifier={c.identifier}>
                  <td className="px-4 py-2">
                    <Link to={`/glassware/${encodeURIComponent(c.identifier)}`} className="num inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4">
                      {c.identifier}
                    </Link>
                  </td>
                  <td className="px-4 py-2">
                    <Link to={`/inventory/volumetric-ware/${c.wareId}`} className="num font-semibold underline underline-offset-4">
                      {c.ware}
                    </Link>
                    <span className="block text-sm text-ink-soft">{CHECK_KIND_LABELS[kindOf.get(c.wareId) ?? ''] ?? ''}</span>
                  </td>
                  <td className="px-4 py-2">
                    <CheckStatusBadge status={c.status} />
                  </td>
                  <td className="px-4 py-2">
                    <VerdictBadge verdict={c.verdict} />
                  </td>
                  <td className="px-4 py-2 text-sm">{formatDateTime(c.createdAt, tz)}</td>
                  <td className="num px-4 py-2">{c.nextDueOn ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
