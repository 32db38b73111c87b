import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ExpiryExtensionInput } from '../../../../shared/schemas/expiry.ts';
import type { PreparationDetail } from '../../../../shared/schemas/preparations.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';

/**
 * POST /api/preparations/:key/expiry-extensions (QA) → 201 PreparationDetail. The fresh record replaces the
 * cached one under both keys; lists are refetched (the shown status and the expiry changed).
 */
export function useExtendExpiry(key: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ExpiryExtensionInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}/expiry-extensions`, input),
    onSuccess: (detail) => {
      queryClient.setQueryData(preparationKeys.detail(detail.identifier), detail);
      queryClient.setQueryData(preparationKeys.detail(String(detail.id)), detail);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
    },
    onError: () => {
      // a refused signature may still have been audited or counted: reload the record
      void queryClient.invalidateQueries({ queryKey: preparationKeys.detail(key) });
    },
  });
}
