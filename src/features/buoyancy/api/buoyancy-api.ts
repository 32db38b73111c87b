/**
 * The buoyancy factor table as the client reads it (shared/schemas/buoyancy-table.ts):
 *   GET /api/calc/buoyancy-table?t=&p=&rh=&weightDensity=      → BuoyancyTableResponse
 *   GET /api/calc/buoyancy-table.pdf?…                        → the A4 sheet for the balance
 */
import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { BuoyancyTableResponse } from '../../../../shared/schemas/buoyancy-table.ts';

export type { BuoyancyTableResponse };

export interface BuoyancyParams {
  t?: string;
  p?: string;
  rh?: string;
  weightDensity?: string;
}

export function buoyancyQueryString(p: BuoyancyParams): string {
  const q = new URLSearchParams();
  for (const k of ['t', 'p', 'rh', 'weightDensity'] as const) if (p[k]) q.set(k, p[k]!);
  const s = q.toString();
  return s ? `?${s}` : '';
}

export const buoyancyUrls = {
  pdf: (p: BuoyancyParams) => `/api/calc/buoyancy-table.pdf${buoyancyQueryString(p)}`,
};

export const buoyancyQueries = {
  table: (p: BuoyancyParams) =>
    queryOptions({
      queryKey: ['calc', 'buoyancy-table', p] as const,
      queryFn: () => api.get<BuoyancyTableResponse>(`/api/calc/buoyancy-table${buoyancyQueryString(p)}`),
      placeholderData: keepPreviousData,
      retry: false,
    }),
};
