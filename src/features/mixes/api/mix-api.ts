/**
 * Mixes as the client calls them (shared/schemas/lineage.ts):
 *   GET  /api/preparations?status=verified&search=…  the standards that can go into a mix
 *   POST /api/mixes  MixInput → 201 PreparationDetail (kind 'mix', lineage.mix)
 * Each component's aliquot goes through POST /api/preparations/:key/aliquots with its componentId
 * (the dilution bench's own AliquotForm, src/features/lineage/components/aliquot-form.tsx).
 */
import { keepPreviousData, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { MixInput } from '../../../../shared/schemas/lineage.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';
import type { PreparationDetail, PreparationList } from '../../preparations/types.ts';

export const mixKeys = {
  all: ['mixes'] as const,
  parents: (search: string) => [...mixKeys.all, 'parents', search] as const,
};

export const mixQueries = {
  /** Verified standards matching `search` (identifier, analyte or material), newest first. */
  parents: (search: string) =>
    queryOptions({
      queryKey: mixKeys.parents(search),
      queryFn: () => api.get<PreparationList>(`/api/preparations?status=verified&pageSize=25${search.trim() ? `&search=${encodeURIComponent(search.trim())}` : ''}`),
      placeholderData: keepPreviousData,
      staleTime: 10_000,
    }),
};

export function useCreateMix() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: MixInput) => api.post<PreparationDetail>('/api/mixes', input),
    onSuccess: (d, input) => {
      queryClient.setQueryData(preparationKeys.detail(d.identifier), d);
      queryClient.setQueryData(preparationKeys.detail(String(d.id)), d);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
      for (const c of input.components) void queryClient.invalidateQueries({ queryKey: preparationKeys.detail(c.parentKey) });
      void queryClient.invalidateQueries({ queryKey: ['trace'] });
    },
  });
}
