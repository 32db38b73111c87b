import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { ReviewFlagInput, TraceResponse } from '../types.ts';

export type TraceRange = { from?: string; to?: string };

export const traceKeys = {
  all: ['trace'] as const,
  detail: (identifier: string, range: TraceRange = {}) => [...traceKeys.all, identifier, range.from ?? '', range.to ?? ''] as const,
};

export function rangeQuery(range: TraceRange): string {
  const q = new URLSearchParams();
  if (range.from) q.set('from', range.from);
  if (range.to) q.set('to', range.to);
  const s = q.toString();
  return s ? `?${s}` : '';
}

export const traceQueries = {
  detail: (identifier: string, range: TraceRange = {}) =>
    queryOptions({
      queryKey: traceKeys.detail(identifier, range),
      queryFn: () => api.get<TraceResponse>(`/api/trace/${encodeURIComponent(identifier)}${rangeQuery(range)}`),
      enabled: identifier !== '',
      staleTime: 5_000,
      retry: false,
    }),
};

export function reportUrl(identifier: string, format: 'pdf' | 'csv', range: TraceRange = {}): string {
  return `/api/trace/${encodeURIComponent(identifier)}/report.${format}${rangeQuery(range)}`;
}

/** The forward report (everything made with the item, for a recall) of any traced identifier. */
export function forwardReportUrl(identifier: string, format: 'pdf' | 'csv', range: TraceRange = {}): string {
  return `/api/trace/${encodeURIComponent(identifier)}/forward-report.${format}${rangeQuery(range)}`;
}

export function useFlagForReview(identifier: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ReviewFlagInput) => api.post<unknown>(`/api/trace/${encodeURIComponent(identifier)}/review-flags`, input),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: traceKeys.all });
      void queryClient.invalidateQueries({ queryKey: ['preparations'] });
    },
  });
}
