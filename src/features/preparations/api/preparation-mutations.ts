import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { CreatePreparationInput, MakeUpInput, PreparationDetail, WeighingInput } from '../types.ts';
import { preparationKeys } from './preparation-keys.ts';

/** Put a fresh detail in the cache under both of its keys (numeric id and identifier). */
function useStoreDetail() {
  const queryClient = useQueryClient();
  return (detail: PreparationDetail) => {
    queryClient.setQueryData(preparationKeys.detail(detail.identifier), detail);
    queryClient.setQueryData(preparationKeys.detail(String(detail.id)), detail);
    void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
  };
}

export function useCreatePreparation() {
  const store = useStoreDetail();
  return useMutation({
    mutationFn: (input: CreatePreparationInput) => api.post<PreparationDetail>('/api/preparations', input),
    onSuccess: store,
  });
}

export function useRecordWeighing(key: string) {
  const store = useStoreDetail();
  return useMutation({
    mutationFn: (input: WeighingInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}/weighings`, input),
    onSuccess: store,
  });
}

export function useRecordMakeUp(key: string) {
  const store = useStoreDetail();
  return useMutation({
    mutationFn: (input: MakeUpInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}/make-up`, input),
    onSuccess: store,
  });
}
