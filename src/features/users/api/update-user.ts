import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { UpdateUserInput, User } from '../../../../shared/schemas/users.ts';
import { userKeys } from './user-keys.ts';

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: UpdateUserInput }) => api.patch<{ user: User }>(`/api/users/${id}`, patch),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: userKeys.lists() }),
  });
}
