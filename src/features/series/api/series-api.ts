/**
 * Calibration series as the client reads them (shared/schemas/lineage.ts):
 *   GET /api/series?parent=&page=&pageSize=  → SeriesList (newest first)
 *   GET /api/series/:key                     → SeriesDetail (every level in full)
 *   GET /api/series/:key/sheet.pdf           → the printed series sheet (rendered on the server)
 */
import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { SeriesDetail, SeriesList } from '../../../../shared/schemas/lineage.ts';

export type { SeriesDetail, SeriesLevelDetail, SeriesList, SeriesSummary } from '../../../../shared/schemas/lineage.ts';

export interface SeriesListParams {
  parent?: string;
  page?: number;
  pageSize?: number;
}

export const seriesKeys = {
  all: ['series'] as const,
  lists: () => [...seriesKeys.all, 'list'] as const,
  list: (p: SeriesListParams) => [...seriesKeys.lists(), p] as const,
  detail: (key: string) => [...seriesKeys.all, 'detail', key] as const,
};

export const seriesUrls = {
  page: (identifier: string) => `/series/${encodeURIComponent(identifier)}`,
  sheet: (identifier: string) => `/api/series/${encodeURIComponent(identifier)}/sheet.pdf`,
};

function listQuery(p: SeriesListParams): string {
  const q = new URLSearchParams();
  if (p.parent) q.set('parent', p.parent);
  q.set('page', String(p.page ?? 1));
  q.set('pageSize', String(p.pageSize ?? 25));
  return q.toString();
}

export const seriesQueries = {
  list: (p: SeriesListParams) =>
    queryOptions({
      queryKey: seriesKeys.list(p),
      queryFn: () => api.get<SeriesList>(`/api/series?${listQuery(p)}`),
      placeholderData: keepPreviousData,
      staleTime: 10_000,
    }),
  detail: (key: string) =>
    queryOptions({
      queryKey: seriesKeys.detail(key),
      queryFn: () => api.get<SeriesDetail>(`/api/series/${encodeURIComponent(key)}`),
      staleTime: 5_000,
    }),
};
