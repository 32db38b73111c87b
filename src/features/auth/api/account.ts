import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ActiveSession, ChangePasswordInput } from '../../../../shared/schemas/auth.ts';
import type { SessionUser } from '../types.ts';
import { authKeys } from './auth-keys.ts';

/** POST /api/auth/password: the server ends every session and answers with a fresh cookie for this browser. */
export function useChangePassword() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ChangePasswordInput) => api.post<{ user: SessionUser }>('/api/auth/password', input),
    onSuccess: (res) => {
      queryClient.setQueryData(authKeys.me(), res.user);
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'auth' });
    },
  });
}

/** POST /api/auth/logout-everywhere: every session of this account ends, this one included. */
export function useSignOutEverywhere() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ sessionsEnded: number }>('/api/auth/logout-everywhere'),
    onSuccess: () => {
      queryClient.setQueryData(authKeys.me(), null);
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'auth' });
    },
  });
}

export const sessionKeys = { all: ['sessions'] as const };

export const sessionQueries = {
  active: () =>
    queryOptions({
      queryKey: sessionKeys.all,
      queryFn: async () => (await api.get<{ items: ActiveSession[] }>('/api/sessions')).items,
    }),
};

export function useEndSession() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.post<unknown>(`/api/sessions/${encodeURIComponent(id)}/end`),
    onSettled: () => queryClient.invalidateQueries({ queryKey: sessionKeys.all }),
  });
}
