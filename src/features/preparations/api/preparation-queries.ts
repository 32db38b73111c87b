import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { Balance, ReferenceMaterial, Solvent, VolumetricWare } from '../../../../shared/schemas/inventory.ts';
import type { PlanInput, PreparationDetail, PreparationList, PreviewResponse } from '../types.ts';
import { pickerKeys, preparationKeys, type PreparationListParams } from './preparation-keys.ts';

/** Inventory lists answer `{ items }` today and `{ items, total, page, pageSize }` once paged; either works. */
async function items<T>(path: string): Promise<T[]> {
  const body = await api.get<{ items?: T[] } | T[] | null>(path);
  if (Array.isArray(body)) return body;
  return body?.items ?? [];
}

function listQuery(params: PreparationListParams): string {
  const q = new URLSearchParams();
  if (params.mine) q.set('mine', '1');
  if (params.today) q.set('today', '1');
  if (params.status) q.set('status', params.status);
  if (params.search) q.set('search', params.search);
  q.set('page', String(params.page ?? 1));
  q.set('pageSize', String(params.pageSize ?? 25));
  return q.toString();
}

export const preparationQueries = {
  list: (params: PreparationListParams) =>
    queryOptions({
      queryKey: preparationKeys.list(params),
      queryFn: () => api.get<PreparationList>(`/api/preparations?${listQuery(params)}`),
      placeholderData: keepPreviousData,
      staleTime: 10_000,
    }),
  detail: (key: string) =>
    queryOptions({
      queryKey: preparationKeys.detail(key),
      queryFn: () => api.get<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}`),
      staleTime: 5_000,
    }),
  /** The planning preview is a pure calculation on the server; cached by its body. */
  preview: (body: PlanInput | null) =>
    queryOptions({
      queryKey: preparationKeys.preview(body),
      queryFn: () => api.post<PreviewResponse>('/api/preparations/preview', body),
      enabled: body !== null,
      placeholderData: keepPreviousData,
      staleTime: 60_000,
    }),
};

export const pickerQueries = {
  materials: () =>
    queryOptions({
      queryKey: pickerKeys.materials(),
      // The server filter (`usable=1`) is being added; the client also keeps only accepted lots.
      queryFn: async () => (await items<ReferenceMaterial>('/api/materials?usable=1&pageSize=200')).filter((m) => m.status === 'accepted'),
      staleTime: 60_000,
    }),
  balances: () =>
    queryOptions({
      queryKey: pickerKeys.balances(),
      queryFn: async () => (await items<Balance>('/api/balances?usable=1')).filter((b) => b.status === 'in_service'),
      staleTime: 60_000,
    }),
  flasks: () =>
    queryOptions({
      queryKey: pickerKeys.flasks(),
      queryFn: async () =>
        (await items<VolumetricWare>('/api/volumetric-ware?kind=volumetric_flask&usable=1')).filter(
          (w) => w.kind === 'volumetric_flask' && w.status === 'in_service',
        ),
      staleTime: 60_000,
    }),
  solvents: () =>
    queryOptions({
      queryKey: pickerKeys.solvents(),
      queryFn: async () => (await items<Solvent>('/api/solvents')).filter((s) => s.status === 'accepted'),
      staleTime: 60_000,
    }),
};
