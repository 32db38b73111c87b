import type { AuditEntryDto } from '../../../../shared/schemas/audit.ts';
import { actionLabel, entityLabel, formatAuditTime, zoneAbbreviation } from '../format-audit.ts';
import { ChangeList } from './change-list.tsx';

/** The trail as a table: when (lab time zone, named), who, what, record, changes, reason. */
export function AuditTable({ entries, timeZone, caption }: { entries: AuditEntryDto[]; timeZone: string; caption: string }) {
  return (
    <div className="overflow-x-auto rounded-xl border-2 border-line bg-card">
      <table className="w-full min-w-[64rem] border-collapse text-left tabular-nums" data-testid="audit-table">
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-slate-100 text-sm">
          <tr>
            <th scope="col" className="px-4 py-3">#</th>
            <th scope="col" className="px-4 py-3">
              Time <span className="font-normal">({timeZone})</span>
            </th>
            <th scope="col" className="px-4 py-3">Who</th>
            <th scope="col" className="px-4 py-3">Action</th>
            <th scope="col" className="px-4 py-3">Record</th>
            <th scope="col" className="px-4 py-3">Field: old → new</th>
            <th scope="col" className="px-4 py-3">Reason</th>
          </tr>
        </thead>
        <tbody>
          {entries.map((e) => (
            <tr key={e.id} className="border-t border-line align-top" data-testid={`audit-row-${e.id}`}>
              <td className="num px-4 py-2">{e.id}</td>
              <td className="whitespace-nowrap px-4 py-2">
                <time dateTime={e.occurredAt} title={`${e.occurredAt} (UTC)`} className="num block">
                  {formatAuditTime(e.occurredAt, timeZone).split(', ').map((part, i) => (
                    <span key={i} className="block">{part}</span>
                  ))}
                </time>
                <span className="text-sm text-ink-soft">{zoneAbbreviation(e.occurredAt, timeZone)}</span>
              </td>
              <td className="px-4 py-2">
                {e.actorName ?? <span className="text-ink-soft">(not signed in)</span>}
                {e.actorId !== null ? <span className="block text-sm text-ink-soft">user #{e.actorId}</span> : null}
                {e.sessionId ? (
                  <span className="block text-sm text-ink-soft" title={`Session ${e.sessionId}`} data-testid="audit-session">
                    session {e.sessionId.slice(0, 8)}…
                  </span>
                ) : null}
              </td>
              <td className="min-w-[8rem] px-4 py-2 font-semibold">{actionLabel(e.action)}</td>
              <td className="min-w-[10rem] px-4 py-2">
                {entityLabel(e.entity)}
                {e.entityId !== null ? <span className="num block text-sm text-ink-soft [overflow-wrap:anywhere]">{e.entityId}</span> : null}
              </td>
              <td className="min-w-[18rem] px-4 py-2">
                <ChangeList changes={e.changes} />
              </td>
              <td className="min-w-[10rem] px-4 py-2 [overflow-wrap:anywhere]">{e.reason ?? <span className="text-ink-soft">—</span>}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
