import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { OutboxList, OutboxMessage } from '../../../../shared/schemas/preparations.ts';

export const outboxKeys = {
  all: ['outbox'] as const,
  list: () => [...outboxKeys.all, 'list'] as const,
  message: (id: number) => [...outboxKeys.all, 'message', id] as const,
};

/** What the local fake SMTP server received (admin only; GET /api/outbox and /api/outbox/:id). */
export const outboxQueries = {
  list: () => queryOptions({ queryKey: outboxKeys.list(), queryFn: () => api.get<OutboxList>('/api/outbox'), staleTime: 0, refetchInterval: 15_000 }),
  message: (id: number | null) =>
    queryOptions({
      queryKey: outboxKeys.message(id ?? 0),
      queryFn: () => api.get<OutboxMessage>(`/api/outbox/${id}`),
      enabled: id !== null,
      staleTime: Infinity, // a received message never changes
    }),
};
