import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, type ApiError } from '../../../lib/api-client.ts';
import type { SignatureInput } from '../../../../shared/schemas/preparations.ts';
import type { VolumeCheckPlanInput, VolumeCheckReadingInput } from '../../../../shared/schemas/volume-check.ts';
import type { VolumeCheckDetail } from '../types.ts';
import { volumeCheckKeys } from './volume-check-keys.ts';

function useStoreDetail() {
  const queryClient = useQueryClient();
  return (d: VolumeCheckDetail) => {
    queryClient.setQueryData(volumeCheckKeys.detail(d.identifier), d);
    queryClient.setQueryData(volumeCheckKeys.detail(String(d.id)), d);
    void queryClient.invalidateQueries({ queryKey: volumeCheckKeys.lists() });
    void queryClient.invalidateQueries({ queryKey: volumeCheckKeys.calibration(d.ware.id) });
  };
}

/** POST /api/volume-checks → 201 detail (chemist, technician; the balance gates refuse with 400 and the reasons). */
export function usePlanVolumeCheck() {
  const store = useStoreDetail();
  return useMutation<VolumeCheckDetail, ApiError, VolumeCheckPlanInput>({
    mutationFn: (input) => api.post<VolumeCheckDetail>('/api/volume-checks', input),
    onSuccess: store,
  });
}

/** POST /api/volume-checks/:key/readings → 201 detail. Append-only: a correction names the reading it supersedes. */
export function useRecordReading(key: string) {
  const store = useStoreDetail();
  return useMutation<VolumeCheckDetail, ApiError, VolumeCheckReadingInput>({
    mutationFn: (input) => api.post<VolumeCheckDetail>(`/api/volume-checks/${encodeURIComponent(key)}/readings`, input),
    onSuccess: store,
  });
}

/**
 * POST /api/volume-checks/:key/signatures → 201 detail. Takes the signature dialog's input (prepared, verified
 * or returned; the dialog never offers "discarded" for a check). A refusal refetches the record: canSign may differ.
 */
export function useSignVolumeCheck(key: string) {
  const store = useStoreDetail();
  const queryClient = useQueryClient();
  return useMutation<VolumeCheckDetail, ApiError, SignatureInput>({
    mutationFn: ({ meaning, password, reason, checklist, acknowledgeResponsibility }) =>
      api.post<VolumeCheckDetail>(`/api/volume-checks/${encodeURIComponent(key)}/signatures`, {
        meaning,
        password,
        ...(reason ? { reason } : {}),
        ...(checklist ? { checklist } : {}),
        ...(acknowledgeResponsibility ? { acknowledgeResponsibility } : {}),
      }),
    onSuccess: store,
    onError: () => void queryClient.invalidateQueries({ queryKey: volumeCheckKeys.detail(key) }),
  });
}
