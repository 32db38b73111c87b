import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { VolumetricWare } from '../../../../shared/schemas/inventory.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import type { DilutionInput, SeriesCreated, SeriesInput, SeriesProposal, SeriesProposalInput } from '../types.ts';

export const lineageKeys = {
  all: ['lineage'] as const,
  ware: (kind: string) => [...lineageKeys.all, 'ware', kind] as const,
  series: (key: string) => [...lineageKeys.all, 'series', key] as const,
};

export type WareKind = 'bulb_pipette' | 'graduated_pipette' | 'piston_pipette' | 'volumetric_flask';

async function items<T>(path: string): Promise<T[]> {
  const body = await api.get<{ items?: T[] } | T[] | null>(path);
  if (Array.isArray(body)) return body;
  return body?.items ?? [];
}

export const lineageQueries = {
  /** Usable (in-service) ware of one kind, smallest first. */
  ware: (kind: WareKind) =>
    queryOptions({
      queryKey: lineageKeys.ware(kind),
      queryFn: async () =>
        (await items<VolumetricWare>(`/api/volumetric-ware?usable=1&kind=${kind}&pageSize=200`))
          .filter((w) => w.kind === kind && w.status === 'in_service')
          .sort((a, b) => Number(a.nominalVolumeMl) - Number(b.nominalVolumeMl) || a.identifier.localeCompare(b.identifier)),
      staleTime: 60_000,
    }),
};

function useStoreDetail() {
  const queryClient = useQueryClient();
  return (detail: PreparationDetail) => {
    queryClient.setQueryData(preparationKeys.detail(detail.identifier), detail);
    queryClient.setQueryData(preparationKeys.detail(String(detail.id)), detail);
    void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
  };
}

export function useCreateDilution(parentKey: string) {
  const store = useStoreDetail();
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: DilutionInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(parentKey)}/dilutions`, input),
    onSuccess: (d) => {
      store(d);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.detail(parentKey) });
      void queryClient.invalidateQueries({ queryKey: ['trace'] });
    },
  });
}

export function useSeriesProposal() {
  return useMutation({
    mutationFn: (input: SeriesProposalInput) => api.post<SeriesProposal>('/api/series/proposal', input),
  });
}

export function useCreateSeries() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SeriesInput) => api.post<SeriesCreated>('/api/series', input),
    onSuccess: (_r, input) => {
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
      void queryClient.invalidateQueries({ queryKey: preparationKeys.detail(input.parentKey) });
      void queryClient.invalidateQueries({ queryKey: ['trace'] });
    },
  });
}
