/**
 * One calibration series: the parent as used, every level with its plan, its concentration (recomputed once the
 * aliquot and make-up are recorded, else planned), expiry, status in words and signatures; a link to each
 * record, a "Bench" link for chemists and technicians while a level is planned, and the printed series sheet.
 */
import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { formatLabTime } from '../preparations/format.ts';
import { StatusBadge } from '../signatures/components/status-badge.tsx';
import { seriesQueries, seriesUrls, type SeriesLevelDetail } from './api/series-api.ts';
import { aliquotText, benchOpen, levelConcentration, verifiedProgress } from './format.ts';
import { HazardCautions } from '../preparations/components/hazard-cautions.tsx';

const linkButton = 'inline-flex min-h-12 items-center justify-center rounded-lg border-2 px-5 text-base font-semibold';

function Signed({ l, tz }: { l: SeriesLevelDetail; tz: string | undefined }) {
  if (!l.preparedBy && !l.verifiedBy) return <span className="text-ink-soft">not signed yet</span>;
  return (
    <span className="flex flex-col text-sm">
      {l.preparedBy ? (
        <span>
          Prepared: <span className="font-semibold">{l.preparedBy.fullName}</span>, {formatLabTime(l.preparedBy.signedAt, tz)}
        </span>
      ) : null}
      {l.verifiedBy ? (
        <span>
          Verified: <span className="font-semibold">{l.verifiedBy.fullName}</span>, {formatLabTime(l.verifiedBy.signedAt, tz)}
        </span>
      ) : (
        <span className="text-ink-soft">not verified yet</span>
      )}
    </span>
  );
}

export function SeriesDetailPage() {
  const { identifier = '' } = useParams();
  const auth = useAuth();
  const role = auth.status === 'signed-in' ? auth.user.role : undefined;
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;
  const q = useQuery(seriesQueries.detail(identifier));

  if (q.isPending) return <Spinner label="Loading the series…" />;
  if (q.isError)
    return (
      <Banner title={`No series ${identifier}`}>
        <p>{q.error.message}</p>
        <Link to="/series" className="font-semibold underline">
          All calibration series
        </Link>
      </Banner>
    );
  const s = q.data;
  const p = s.parent;
  // one expiry basis for the whole series is said once above the table; a level with another basis says its own
  const reasons = [...new Set(s.levels.map((l) => l.expiryReason))];
  const commonReason = reasons.length === 1 ? reasons[0] : undefined;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={
          <span>
            Calibration series <span className="num" data-testid="series-identifier">{s.identifier}</span>
          </span>
        }
      >
        <p>
          <span className="num">{s.analyteFormula}</span> in {s.unit}, {s.levels.length} levels, planned by {s.createdBy.fullName} on {formatLabTime(s.createdAt, tz)} ·{' '}
          <span className="font-semibold text-ink" data-testid="series-progress">
            {verifiedProgress(s.levels)}
          </span>
        </p>
      </PageHeader>

      <div className="flex flex-wrap gap-3">
        <a href={seriesUrls.sheet(s.identifier)} target="_blank" rel="noreferrer" data-testid="series-sheet" className={`${linkButton} border-slate-700 bg-slate-700 text-white hover:bg-slate-900`}>
          Print series sheet
        </a>
        <Link to={`/preparations/${encodeURIComponent(p.identifier)}`} data-testid="series-parent-link" className={`${linkButton} border-slate-700 bg-card hover:bg-slate-100`}>
          Parent {p.identifier}
        </Link>
        <Link to="/series" className={`${linkButton} border-line bg-card hover:border-slate-700`}>
          All series
        </Link>
      </div>

      <Panel title="Parent standard (as used)" id="series-parent">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid="series-parent">
          <dt className="font-semibold text-ink-soft">Identifier</dt>
          <dd>
            <Link to={`/preparations/${encodeURIComponent(p.identifier)}`} className="num font-semibold text-brass-600 underline">
              {p.identifier}
            </Link>{' '}
            (version {p.version} as used) · now <StatusBadge status={p.status} />
          </dd>
          <dt className="font-semibold text-ink-soft">Concentration</dt>
          <dd className="num text-xl font-semibold" data-testid="series-parent-conc">
            {p.concentrationDisplay || '—'}
          </dd>
          <dt className="font-semibold text-ink-soft">Expires</dt>
          <dd className="num">{p.expiresOn || '—'}</dd>
          <dt className="font-semibold text-ink-soft">Reference material</dt>
          <dd>
            {p.material.name}
            {p.material.producer ? `, ${p.material.producer}` : ''}, lot <span className="num">{p.material.lot}</span>
            {p.material.certificateNumber ? (
              <>
                , certificate <span className="num">{p.material.certificateNumber}</span>
              </>
            ) : null}
          </dd>
          {s.notes ? (
            <>
              <dt className="font-semibold text-ink-soft">Notes</dt>
              <dd>{s.notes}</dd>
            </>
          ) : null}
        </dl>
      </Panel>

      <HazardCautions hazards={s.hazards} testId="series-cautions" />

      <Panel title="Levels" id="series-levels">
        <p className="mb-3 text-ink-soft">
          Each level is its own record: pipette the aliquot, make up to the mark, then sign and verify it. The concentration is the recomputed one once the aliquot
          and make-up are recorded, otherwise the planned one{tz ? `; times in ${tz}` : ''}.
        </p>
        {commonReason ? (
          <p className="mb-3" data-testid="series-expiry-basis">
            <span className="font-semibold">Expiry of every level:</span> {commonReason}
          </p>
        ) : null}
        <div className="overflow-x-auto">
          <table className="w-full border-collapse text-left" data-testid="series-levels-table">
            <thead>
              <tr className="border-b-2 border-line">
                <th className="p-2">Level</th>
                <th className="p-2">Identifier</th>
                <th className="p-2">Target</th>
                <th className="p-2">Aliquot</th>
                <th className="p-2">Flask</th>
                <th className="p-2">Concentration ± U</th>
                <th className="p-2">Expires</th>
                <th className="p-2">Status</th>
                <th className="p-2">Signatures</th>
                <th className="p-2">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {s.levels.map((l) => {
                const c = levelConcentration(l);
                return (
                  <tr key={l.id} className="border-b border-line align-top" data-testid={`series-level-${l.levelNo}`}>
                    <td className="num p-2 font-semibold">{l.levelNo}</td>
                    <td className="p-2">
                      <Link to={`/preparations/${encodeURIComponent(l.identifier)}`} className="num inline-flex min-h-12 items-center whitespace-nowrap font-semibold text-brass-600 underline" data-testid="series-level-link">
                        {l.identifier}
                      </Link>
                    </td>
                    <td className="num whitespace-nowrap p-2">
                      {l.target.value} {l.target.unit}
                    </td>
                    <td className="num p-2">
                      <span className="whitespace-nowrap">{l.aliquot.volumeMl} mL</span>
                      <span className="block whitespace-nowrap text-sm text-ink-soft" title={aliquotText(l)}>
                        {l.aliquot.pipette.identifier}
                      </span>
                      {l.aliquotRecorded ? (
                        <span className="block text-sm text-ink-soft">
                          delivered {l.aliquotRecorded.volumeMl} mL with {l.aliquotRecorded.pipetteIdentifier}
                        </span>
                      ) : null}
                    </td>
                    <td className="num p-2">
                      <span className="whitespace-nowrap">{l.flask.identifier}</span>
                      <span className="block whitespace-nowrap text-sm text-ink-soft">{l.flask.nominalVolumeMl} mL</span>
                    </td>
                    <td className="num p-2" data-testid="series-level-conc">
                      <span className={c.basis === 'recomputed' ? 'text-lg font-semibold' : ''}>{c.text}</span>
                      <span className="block font-sans text-sm text-ink-soft">{c.basis === 'recomputed' ? 'recomputed' : 'planned'}</span>
                      {c.basis === 'recomputed' ? <span className="block text-sm text-ink-soft">planned {l.planned.display}</span> : null}
                    </td>
                    <td className="num p-2">
                      <span className="whitespace-nowrap">{l.expiresOn}</span>
                      {commonReason ? null : <span className="block font-sans text-sm text-ink-soft">{l.expiryReason}</span>}
                    </td>
                    <td className="p-2">
                      <StatusBadge status={l.status} testId="series-level-status" />
                    </td>
                    <td className="p-2">
                      <Signed l={l} tz={tz} />
                    </td>
                    <td className="p-2">
                      {benchOpen(l.status, role) ? (
                        <Link to={`/preparations/${encodeURIComponent(l.identifier)}/bench`} data-testid="series-level-bench" className={`${linkButton} border-brass-600 bg-brass-100 hover:bg-brass-400/40`}>
                          Bench
                        </Link>
                      ) : null}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      </Panel>
    </div>
  );
}
