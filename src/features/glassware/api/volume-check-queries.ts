import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { VolumeCheckRequestInput } from '../../../../shared/schemas/volume-check.ts';
import type { VolumeCheckDetail, VolumeCheckResponse, VolumeCheckSummary, WareCalibration } from '../types.ts';
import { volumeCheckKeys } from './volume-check-keys.ts';

export const volumeCheckQueries = {
  /** GET /api/volume-checks[?wareId=], newest first */
  list: (wareId: number | null) =>
    queryOptions({
      queryKey: volumeCheckKeys.list(wareId),
      queryFn: async () => (await api.get<{ items: VolumeCheckSummary[] }>(`/api/volume-checks${wareId ? `?wareId=${wareId}` : ''}`)).items,
      placeholderData: keepPreviousData,
      staleTime: 10_000,
    }),
  /** GET /api/volume-checks/:key (id or VC-YYYY-NNNN) */
  detail: (key: string) =>
    queryOptions({
      queryKey: volumeCheckKeys.detail(key),
      queryFn: () => api.get<VolumeCheckDetail>(`/api/volume-checks/${encodeURIComponent(key)}`),
      staleTime: 5_000,
    }),
  /** GET /api/volumetric-ware/:id/calibration: status from the latest verified check */
  calibration: (wareId: number) =>
    queryOptions({
      queryKey: volumeCheckKeys.calibration(wareId),
      queryFn: () => api.get<WareCalibration>(`/api/volumetric-ware/${wareId}/calibration`),
      staleTime: 10_000,
    }),
  /** POST /api/calc/volume-check: stateless; the bench's live volumes and running mean (nothing stored). */
  live: (body: VolumeCheckRequestInput | null) =>
    queryOptions({
      queryKey: volumeCheckKeys.live(body),
      queryFn: () => api.post<VolumeCheckResponse>('/api/calc/volume-check', body),
      enabled: body !== null,
      placeholderData: keepPreviousData,
      staleTime: 60_000,
      retry: false,
    }),
};

/** The certificate PDF (any signed-in role; the server records each print in the audit trail). */
export const certificateUrl = (identifier: string) => `/api/volume-checks/${encodeURIComponent(identifier)}/certificate.pdf`;
