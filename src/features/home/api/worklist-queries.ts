import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { WorkLists } from '../../../../shared/schemas/worklists.ts';

export const worklistKeys = {
  all: ['worklists'] as const,
};

/** GET /api/worklists: the signed-in user's work lists (refetched when the home page is shown again). */
export const worklistQueries = {
  mine: () =>
    queryOptions({
      queryKey: worklistKeys.all,
      queryFn: () => api.get<WorkLists>('/api/worklists'),
      staleTime: 0,
    }),
};
