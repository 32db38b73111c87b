import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LabSettings } from '../../../../shared/schemas/settings.ts';

export const settingsKeys = {
  all: ['settings'] as const,
  detail: () => [...settingsKeys.all, 'detail'] as const,
};

/** GET /api/settings: lab name, default room conditions and the rounding rule (any signed-in role). */
export const settingsQueries = {
  detail: () => queryOptions({ queryKey: settingsKeys.detail(), queryFn: () => api.get<LabSettings>('/api/settings'), staleTime: 5 * 60_000 }),
};
