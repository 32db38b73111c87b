import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { authKeys } from './auth-keys.ts';

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<unknown>('/api/auth/logout'),
    onSettled: () => {
      // Whatever the server said, this browser forgets the user and every cached record.
      queryClient.setQueryData(authKeys.me(), null);
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'auth' });
    },
  });
}
