import { useQuery } from '@tanstack/react-query';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { roleLabel } from '../../lib/format.ts';
import { sessionQueries, useEndSession } from '../auth/api/account.ts';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { formatLabTime } from '../preparations/format.ts';

/**
 * /sessions (QA and admin): every session that has not ended, who holds it, since when, last activity and when
 * it ends at the latest. An administrator can end one; the person must sign in again on that device.
 */
export function SessionsPage() {
  const auth = useAuth();
  const list = useQuery(sessionQueries.active());
  const settings = useQuery(settingsQueries.detail());
  const end = useEndSession();
  const tz = settings.data?.timeZone;
  const isAdmin = auth.status === 'signed-in' && auth.user.role === 'admin';
  const items = list.data ?? [];

  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Active sessions">
        Who is signed in, and where. A session ends at sign-out, after a period without activity, at the latest 12 hours
        after sign-in, and at once for every device when the password changes or the account is locked or deactivated.
      </PageHeader>
      <div className="flex flex-wrap items-center gap-3">
        <Button variant="secondary" onClick={() => void list.refetch()} busy={list.isFetching} data-testid="sessions-refresh">
          Refresh
        </Button>
        {list.data ? (
          <p className="text-ink-soft" data-testid="sessions-count">
            {items.length} active session{items.length === 1 ? '' : 's'}
            {tz ? ` · times in ${tz}` : ''}
          </p>
        ) : null}
      </div>
      {end.isError ? <Banner title="The session was not ended">{end.error.message}</Banner> : null}
      <Panel>
        {list.isPending ? (
          <Spinner label="Loading sessions…" />
        ) : list.isError ? (
          <Banner title="The sessions could not be loaded">{list.error.message}</Banner>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left" data-testid="sessions-table">
              <thead>
                <tr className="border-b-2 border-line text-sm text-ink-soft">
                  <th className="py-2 pr-4">Person</th>
                  <th className="py-2 pr-4">Signed in</th>
                  <th className="py-2 pr-4">Last activity</th>
                  <th className="py-2 pr-4">Ends without activity</th>
                  <th className="py-2 pr-4">Ends at the latest</th>
                  <th className="py-2 pr-4">Device</th>
                  {isAdmin ? <th className="py-2">Action</th> : null}
                </tr>
              </thead>
              <tbody>
                {items.map((s) => (
                  <tr key={s.id} className="border-b border-line align-top" data-testid="session-row">
                    <td className="py-3 pr-4">
                      <span className="block font-semibold">
                        {s.fullName} ({s.initials})
                      </span>
                      <span className="text-sm text-ink-soft">{roleLabel(s.role)}</span>
                    </td>
                    <td className="py-3 pr-4">{formatLabTime(s.createdAt, tz)}</td>
                    <td className="py-3 pr-4">{formatLabTime(s.lastSeenAt, tz)}</td>
                    <td className="py-3 pr-4">{formatLabTime(s.idleExpiresAt, tz)}</td>
                    <td className="py-3 pr-4">{formatLabTime(s.expiresAt, tz)}</td>
                    <td className="max-w-56 break-words py-3 pr-4 text-sm text-ink-soft">
                      {s.ip ?? '—'}
                      {s.userAgent ? <span className="block">{s.userAgent}</span> : null}
                    </td>
                    {isAdmin ? (
                      <td className="py-3">
                        <Button
                          variant="danger"
                          data-testid="end-session"
                          busy={end.isPending && end.variables === s.id}
                          onClick={() => {
                            if (window.confirm(`End this session of ${s.fullName}? They must sign in again on that device.`)) end.mutate(s.id);
                          }}
                        >
                          End session
                        </Button>
                      </td>
                    ) : null}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Panel>
    </div>
  );
}
