import type { InventoryKind } from '../kinds.ts';
import type { ListParams } from '../list-params.ts';

export const inventoryKeys = {
  all: ['inventory'] as const,
  kind: (kind: InventoryKind) => [...inventoryKeys.all, kind] as const,
  lists: (kind: InventoryKind) => [...inventoryKeys.kind(kind), 'list'] as const,
  list: (kind: InventoryKind, params: ListParams) => [...inventoryKeys.lists(kind), params] as const,
  details: (kind: InventoryKind) => [...inventoryKeys.kind(kind), 'detail'] as const,
  detail: (kind: InventoryKind, id: number) => [...inventoryKeys.details(kind), id] as const,
  certificates: (materialId: number) => [...inventoryKeys.kind('materials'), 'certificates', materialId] as const,
};
