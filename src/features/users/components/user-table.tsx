import { useState } from 'react';
import { ROLES, ROLE_LABELS, type Role, type User } from '../../../../shared/schemas/users.ts';
import { Banner } from '../../../components/ui/feedback.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useUpdateUser } from '../api/update-user.ts';
import { useUnlockUser } from '../api/unlock-user.ts';

const small = 'min-h-12 rounded-lg border-2 px-4 font-semibold disabled:cursor-not-allowed disabled:opacity-60';

function StatusBadges({ user }: { user: User }) {
  return (
    <span className="flex flex-wrap gap-2">
      {user.active ? (
        <span className="rounded-full bg-ok-50 px-3 py-0.5 text-sm font-semibold text-ok-700">Active</span>
      ) : (
        <span className="rounded-full bg-slate-100 px-3 py-0.5 text-sm font-semibold text-ink-soft">Inactive</span>
      )}
      {user.locked ? <span className="rounded-full bg-bad-50 px-3 py-0.5 text-sm font-semibold text-bad-700">Locked</span> : null}
      {user.mustChangePassword ? (
        <span className="rounded-full bg-slate-100 px-3 py-0.5 text-sm font-semibold text-ink" data-testid="user-temporary-password">
          Temporary password
        </span>
      ) : null}
    </span>
  );
}

export function UserTable({ users, currentUserId }: { users: User[]; currentUserId: number | string }) {
  const update = useUpdateUser();
  const unlock = useUnlockUser();
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const busyId = (update.isPending ? update.variables?.id : undefined) ?? (unlock.isPending ? unlock.variables : undefined);

  const onError = (e: Error) => setMessage({ tone: 'error', text: e.message });

  const changeRole = (u: User, role: Role) => {
    setMessage(null);
    update.mutate(
      { id: u.id, patch: { role } },
      { onSuccess: () => setMessage({ tone: 'ok', text: `${u.fullName} is now ${ROLE_LABELS[role]}.` }), onError },
    );
  };
  const setActive = (u: User, active: boolean) => {
    setMessage(null);
    update.mutate(
      { id: u.id, patch: { active } },
      { onSuccess: () => setMessage({ tone: 'ok', text: `${u.fullName} was ${active ? 'reactivated' : 'deactivated'}.` }), onError },
    );
  };
  const doUnlock = (u: User) => {
    setMessage(null);
    unlock.mutate(u.id, { onSuccess: () => setMessage({ tone: 'ok', text: `${u.fullName} was unlocked.` }), onError });
  };

  return (
    <div className="flex flex-col gap-3">
      {message ? <Banner tone={message.tone}>{message.text}</Banner> : null}
      <div className="overflow-x-auto rounded-xl border-2 border-line bg-card">
        <table className="w-full min-w-[42rem] border-collapse text-left" data-testid="user-table">
          <caption className="sr-only">User accounts</caption>
          <thead className="bg-slate-100 text-sm">
            <tr>
              <th scope="col" className="px-4 py-3">Person</th>
              <th scope="col" className="px-4 py-3">Role</th>
              <th scope="col" className="px-4 py-3">Status and last sign-in</th>
              <th scope="col" className="px-4 py-3">Actions</th>
            </tr>
          </thead>
          <tbody>
            {users.map((u) => {
              const self = String(u.id) === String(currentUserId);
              const busy = busyId === u.id;
              return (
                <tr key={u.id} className="border-t border-line align-middle" data-testid={`user-row-${u.id}`}>
                  <td className="px-4 py-2">
                    <span className="flex items-center gap-3">
                      <span aria-hidden="true" className="flex size-9 shrink-0 items-center justify-center rounded-full bg-slate-100 text-sm font-bold">
                        {u.initials}
                      </span>
                      <span className="min-w-0">
                        <span className="block font-semibold">
                          {u.fullName}
                          {self ? <span className="ml-1 text-sm font-normal text-ink-soft">(you)</span> : null}
                        </span>
                        <span className="block text-sm text-ink-soft [overflow-wrap:anywhere]">{u.email}</span>
                      </span>
                    </span>
                  </td>
                  <td className="px-4 py-2">
                    <label className="sr-only" htmlFor={`role-${u.id}`}>
                      Role of {u.fullName}
                    </label>
                    <select
                      id={`role-${u.id}`}
                      name={`role-${u.id}`}
                      value={u.role}
                      disabled={busy || self}
                      title={self ? 'You cannot change your own role' : undefined}
                      onChange={(e) => changeRole(u, e.target.value as Role)}
                      className="field-input min-w-44"
                    >
                      {ROLES.map((r) => (
                        <option key={r} value={r}>
                          {ROLE_LABELS[r]}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td className="px-4 py-2">
                    <StatusBadges user={u} />
                    <span className="mt-1 block text-sm text-ink-soft">
                      {u.lastLoginAt ? `Last sign-in ${formatDateTime(u.lastLoginAt)}` : 'Never signed in'}
                    </span>
                  </td>
                  <td className="px-4 py-2">
                    <span className="flex flex-wrap gap-2">
                      {u.locked ? (
                        <button type="button" disabled={busy} onClick={() => doUnlock(u)} className={`${small} border-slate-700 bg-card`}>
                          Unlock
                        </button>
                      ) : null}
                      {u.active ? (
                        <button
                          type="button"
                          disabled={busy || self}
                          title={self ? 'You cannot deactivate your own account' : undefined}
                          onClick={() => setActive(u, false)}
                          className={`${small} border-bad-700 bg-card text-bad-700`}
                        >
                          Deactivate
                        </button>
                      ) : (
                        <button type="button" disabled={busy} onClick={() => setActive(u, true)} className={`${small} border-slate-700 bg-card`}>
                          Reactivate
                        </button>
                      )}
                    </span>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
