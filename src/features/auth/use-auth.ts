import { useQuery } from '@tanstack/react-query';
import { authQueries } from './api/auth-queries.ts';
import type { Role, SessionUser } from './types.ts';

export type AuthState =
  | { status: 'loading'; user: null; error: null }
  | { status: 'error'; user: null; error: Error }
  | { status: 'signed-out'; user: null; error: null }
  | { status: 'signed-in'; user: SessionUser; error: null };

/** The session as the server sees it (GET /api/auth/me), cached by TanStack Query. */
export function useAuth(): AuthState & { refetch: () => void } {
  const q = useQuery(authQueries.me());
  const refetch = () => void q.refetch();
  if (q.isPending) return { status: 'loading', user: null, error: null, refetch };
  if (q.isError) return { status: 'error', user: null, error: q.error, refetch };
  if (!q.data) return { status: 'signed-out', user: null, error: null, refetch };
  return { status: 'signed-in', user: q.data, error: null, refetch };
}

/** What each role may do, in the words the home page and the navigation use. */
export const ROLE_ABILITIES: Record<Role, string[]> = {
  chemist: [
    'Plan calibration standards and calculate the mass to weigh',
    'Record weighings and see the concentration with its uncertainty',
    "Verify other people's preparations (never your own)",
  ],
  technician: [
    'Do the bench work: weigh and record readings',
    'Use the calculator to check the reading to aim for',
    'Print and reprint labels for released standards',
  ],
  qa: [
    'Read every record',
    'Review the audit trail and trace standards back to their materials',
    'Use the calculator to re-check a result',
  ],
  admin: [
    'Manage user accounts: create, change role, deactivate, unlock',
    'Look after instruments and lab settings',
    'Use the calculator',
  ],
};

export function hasRole(user: SessionUser | null, roles: readonly Role[]): boolean {
  return !!user && roles.includes(user.role);
}
