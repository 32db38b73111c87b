import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { PreparationDetail, SignatureInput } from '../../../../shared/schemas/preparations.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';

/**
 * POST /api/preparations/:key/signatures → 201 PreparationDetail. The fresh record replaces the cached one
 * under both of its keys; lists are refetched (the status changed). On an error the cached record is
 * refetched too, since a refused signature may still have been audited and the canSign reasons may differ.
 */
export function useSignPreparation(key: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SignatureInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}/signatures`, input),
    onSuccess: (detail) => {
      queryClient.setQueryData(preparationKeys.detail(detail.identifier), detail);
      queryClient.setQueryData(preparationKeys.detail(String(detail.id)), detail);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
    },
  });
}
