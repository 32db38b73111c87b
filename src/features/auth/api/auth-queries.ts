import { queryOptions } from '@tanstack/react-query';
import { api, ApiError } from '../../../lib/api-client.ts';
import type { SessionUser } from '../types.ts';
import { authKeys } from './auth-keys.ts';

export const authQueries = {
  /** The signed-in user, or null when the session is missing or expired (401). */
  me: () =>
    queryOptions({
      queryKey: authKeys.me(),
      queryFn: async (): Promise<SessionUser | null> => {
        try {
          const res = await api.get<{ user: SessionUser }>('/api/auth/me');
          return res.user ?? null;
        } catch (e) {
          if (e instanceof ApiError && e.status === 401) return null;
          throw e;
        }
      },
      staleTime: 60_000,
    }),
};
