import type { AuditFilter } from '../../../../shared/schemas/audit.ts';

export const auditKeys = {
  all: ['audit'] as const,
  lists: () => [...auditKeys.all, 'list'] as const,
  list: (params: string) => [...auditKeys.lists(), params] as const,
  actors: () => [...auditKeys.all, 'actors'] as const,
  records: () => [...auditKeys.all, 'record'] as const,
  record: (entity: string, entityId: string) => [...auditKeys.records(), entity, entityId] as const,
};

export type AuditFilterValues = { [K in keyof AuditFilter]?: string };
