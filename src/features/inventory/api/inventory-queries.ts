import { queryOptions, keepPreviousData } from '@tanstack/react-query';
import type { z } from 'zod';
import { api } from '../../../lib/api-client.ts';
import {
  balanceSchema,
  certificateListResponseSchema,
  referenceMaterialSchema,
  solventSchema,
  volumetricWareSchema,
  type Certificate,
  pagedResponseSchema,
  type Paged,
} from '../../../../shared/schemas/inventory.ts';
import { KIND_INFO, type InventoryKind } from '../kinds.ts';
import { apiListQuery, type ListDefaults, type ListParams } from '../list-params.ts';
import { inventoryKeys } from './inventory-keys.ts';

/** The read DTO of each register. */
export const ITEM_SCHEMAS = {
  materials: referenceMaterialSchema,
  balances: balanceSchema,
  'volumetric-ware': volumetricWareSchema,
  solvents: solventSchema,
} as const;
export type ItemOf<K extends InventoryKind> = z.infer<(typeof ITEM_SCHEMAS)[K]>;

/**
 * Parse with the shared schema so contract drift shows up here, not as a blank cell. A body that still
 * has the right outline is used (and reported in development); anything else is an error.
 */
function parseOr<T>(schema: z.ZodType<T>, body: unknown, what: string, fallback: (b: unknown) => T | null): T {
  const parsed = schema.safeParse(body);
  if (parsed.success) return parsed.data;
  if (import.meta.env.DEV) console.warn(`${what}: unexpected shape`, parsed.error.issues);
  const loose = fallback(body);
  if (loose === null) throw new Error(`${what}: the server sent an answer Tarebook cannot read.`);
  return loose;
}

export function listQuery<K extends InventoryKind>(kind: K, params: ListParams, defaults: ListDefaults) {
  const schema = pagedResponseSchema(ITEM_SCHEMAS[kind]) as unknown as z.ZodType<Paged<ItemOf<K>>>;
  return queryOptions({
    queryKey: inventoryKeys.list(kind, params),
    queryFn: async (): Promise<Paged<ItemOf<K>>> => {
      const body = await api.get<unknown>(`${KIND_INFO[kind].apiPath}?${apiListQuery(params, defaults)}`);
      return parseOr(schema, body, `GET ${KIND_INFO[kind].apiPath}`, (b) => {
        const o = b as Partial<Paged<ItemOf<K>>> | null;
        return o && Array.isArray(o.items) && typeof o.total === 'number'
          ? { items: o.items, total: o.total, page: o.page ?? params.page, pageSize: o.pageSize ?? params.pageSize }
          : null;
      });
    },
    // Keep the previous page on screen while the next one loads, so paging and sorting do not flash.
    placeholderData: keepPreviousData,
  });
}

export function detailQuery<K extends InventoryKind>(kind: K, id: number) {
  const schema = ITEM_SCHEMAS[kind] as unknown as z.ZodType<ItemOf<K>>;
  return queryOptions({
    queryKey: inventoryKeys.detail(kind, id),
    queryFn: async (): Promise<ItemOf<K>> => {
      const body = await api.get<unknown>(`${KIND_INFO[kind].apiPath}/${id}`);
      return parseOr(schema, body, `GET ${KIND_INFO[kind].apiPath}/${id}`, (b) =>
        b && typeof b === 'object' && 'id' in b ? (b as ItemOf<K>) : null,
      );
    },
  });
}

export function certificatesQuery(materialId: number) {
  return queryOptions({
    queryKey: inventoryKeys.certificates(materialId),
    queryFn: async (): Promise<Certificate[]> => {
      const body = await api.get<unknown>(`/api/materials/${materialId}/certificates`);
      return parseOr(certificateListResponseSchema, body, 'GET certificates', (b) => {
        const o = b as { items?: Certificate[] } | null;
        return o && Array.isArray(o.items) ? { items: o.items } : null;
      }).items;
    },
  });
}

export const certificateFileUrl = (id: number) => `/api/certificates/${id}/file`;
