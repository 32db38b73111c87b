import { useQuery } from '@tanstack/react-query';
import { Banner, Spinner } from '../../../components/ui/feedback.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { settingsQueries } from '../../calculate/api/settings-queries.ts';
import { auditQueries } from '../api/audit-queries.ts';
import { actionLabel, formatAuditTime, zoneAbbreviation } from '../format-audit.ts';
import { ChangeList } from './change-list.tsx';

/**
 * The audit trail of one record, oldest first, for detail pages:
 *   <RecordTrail entity="preparation" entityId={prep.identifier} />
 * Any signed-in role may read it (users and sessions: QA and admin only).
 */
export function RecordTrail({ entity, entityId, title = 'History' }: { entity: string; entityId: string | number; title?: string }) {
  const id = String(entityId);
  const trail = useQuery(auditQueries.record(entity, id));
  const settings = useQuery(settingsQueries.detail());
  const timeZone = settings.data?.timeZone ?? 'UTC';

  return (
    <section aria-labelledby={`trail-${entity}-${id}`} className="flex flex-col gap-3" data-testid="record-trail">
      <h2 id={`trail-${entity}-${id}`} className="text-xl font-bold">
        {title}
      </h2>
      {trail.isPending ? <Spinner label="Loading the history…" /> : null}
      {trail.isError ? (
        <Banner title="Could not load the history">
          {trail.error instanceof ApiError && trail.error.status === 403
            ? 'Only QA and administrators can see the history of this record.'
            : trail.error.message}
        </Banner>
      ) : null}
      {trail.data && trail.data.length === 0 ? <p className="text-ink-soft">No recorded history yet.</p> : null}
      {trail.data && trail.data.length > 0 ? (
        <ol className="flex flex-col gap-2 tabular-nums">
          {trail.data.map((e) => (
            <li key={e.id} className="rounded-lg border-2 border-line bg-card px-4 py-3" data-testid={`trail-entry-${e.id}`}>
              <p className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
                <span className="font-semibold">{actionLabel(e.action)}</span>
                <span>{e.actorName ?? '(not signed in)'}</span>
                <time dateTime={e.occurredAt} title={`${e.occurredAt} (UTC)`} className="num text-sm text-ink-soft">
                  {formatAuditTime(e.occurredAt, timeZone)} {zoneAbbreviation(e.occurredAt, timeZone)} ({timeZone})
                </time>
                <span className="num ml-auto text-sm text-ink-soft">#{e.id}</span>
              </p>
              {e.changes.length > 0 ? (
                <div className="mt-2">
                  <ChangeList changes={e.changes} />
                </div>
              ) : null}
              {e.reason ? <p className="mt-2 text-sm"><span className="font-semibold">Reason:</span> {e.reason}</p> : null}
            </li>
          ))}
        </ol>
      ) : null}
    </section>
  );
}
