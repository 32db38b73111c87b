import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { Balance, VolumetricWare } from '../../../../shared/schemas/inventory.ts';
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

/** Inventory lists answer `{ items, total, … }`. */
async function items<T>(path: string): Promise<T[]> {
  const body = await api.get<{ items?: T[] } | null>(path);
  return body?.items ?? [];
}

export const checkPickerQueries = {
  /** every volumetric ware item (the list filter and the plan's picker keep the kinds a check covers) */
  ware: () =>
    queryOptions({
      queryKey: volumeCheckKeys.pickerWare(),
      queryFn: () => items<VolumetricWare>('/api/volumetric-ware?pageSize=200'),
      staleTime: 60_000,
    }),
  /** balances in service (the server's gates decide whether one suits the volume) */
  balances: () =>
    queryOptions({
      queryKey: volumeCheckKeys.pickerBalances(),
      queryFn: async () => (await items<Balance>('/api/balances?pageSize=200')).filter((b) => b.status === 'in_service'),
      staleTime: 60_000,
    }),
  /** one balance (weight density and calibration uncertainty for the bench's live calculation) */
  balance: (id: number) =>
    queryOptions({
      queryKey: volumeCheckKeys.balance(id),
      queryFn: () => api.get<Balance>(`/api/balances/${id}`),
      staleTime: 60_000,
    }),
};

/** The certificate PDF (any signed-in role; the server records each print in the audit trail). */
export const certificateUrl = (identifier: string) => `/api/volume-checks/${encodeURIComponent(identifier)}/certificate.pdf`;
