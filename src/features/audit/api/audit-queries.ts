import { keepPreviousData, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import {
  auditPageSchema,
  auditTrailSchema,
  auditVerifyResultSchema,
  type AuditEntryDto,
  type AuditPage,
  type AuditVerifyResult,
} from '../../../../shared/schemas/audit.ts';
import { auditKeys } from './audit-keys.ts';

/** Parses with the shared schema so contract drift shows up in the console in dev, not as blank cells. */
function checked<T>(what: string, schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false; error: { issues: unknown } } }, body: unknown): T {
  const parsed = schema.safeParse(body);
  if (parsed.success) return parsed.data;
  if (import.meta.env.DEV) console.warn(`${what}: unexpected shape`, parsed.error.issues);
  return body as T;
}

export const auditQueries = {
  /** `params` is the query string of the filters and page (the same one the CSV link uses). */
  list: (params: string) =>
    queryOptions({
      queryKey: auditKeys.list(params),
      queryFn: async (): Promise<AuditPage> => checked('GET /api/audit', auditPageSchema, await api.get<unknown>(`/api/audit?${params}`)),
      placeholderData: keepPreviousData,
    }),
  actors: () =>
    queryOptions({
      queryKey: auditKeys.actors(),
      queryFn: async () => (await api.get<{ items: Array<{ id: number; name: string }> }>('/api/audit/actors')).items,
      staleTime: 60_000,
    }),
  record: (entity: string, entityId: string) =>
    queryOptions({
      queryKey: auditKeys.record(entity, entityId),
      queryFn: async (): Promise<AuditEntryDto[]> =>
        checked(
          'GET /api/audit/records',
          auditTrailSchema,
          await api.get<unknown>(`/api/audit/records/${encodeURIComponent(entity)}/${encodeURIComponent(entityId)}`),
        ).items,
      retry: false,
    }),
};

/** POST /api/audit/verify: walks the hash chain; the server records the check, so the list refreshes. */
export function useVerifyChain() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (): Promise<AuditVerifyResult> => checked('POST /api/audit/verify', auditVerifyResultSchema, await api.post<unknown>('/api/audit/verify')),
    onSettled: () => queryClient.invalidateQueries({ queryKey: auditKeys.all }),
  });
}
