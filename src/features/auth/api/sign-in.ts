import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { SessionUser } from '../types.ts';
import { authKeys } from './auth-keys.ts';

export type SignInInput = { email: string; password: string };

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) => api.post<{ user: SessionUser }>('/api/auth/login', input),
    onSuccess: (res) => {
      queryClient.setQueryData(authKeys.me(), res.user);
    },
  });
}
