import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LabelPrintHistory, LabelTemplateList } from '../../../../shared/schemas/printing.ts';
import { printingKeys } from './printing-keys.ts';

export const printingQueries = {
  /** GET /api/label-templates (any signed-in role), active and inactive. */
  templates: () =>
    queryOptions({
      queryKey: printingKeys.templates(),
      queryFn: () => api.get<LabelTemplateList>('/api/label-templates'),
      staleTime: 60_000,
    }),
  /** GET /api/preparations/:key/label-prints: newest first, with counts. */
  history: (key: string) =>
    queryOptions({
      queryKey: printingKeys.history(key),
      queryFn: () => api.get<LabelPrintHistory>(`/api/preparations/${encodeURIComponent(key)}/label-prints`),
      staleTime: 5_000,
    }),
};
