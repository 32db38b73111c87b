import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, toApiError } from '../../../lib/api-client.ts';
import type { Certificate } from '../../../../shared/schemas/inventory.ts';
import { KIND_INFO, type InventoryKind } from '../kinds.ts';
import { inventoryKeys } from './inventory-keys.ts';
import type { ItemOf } from './inventory-queries.ts';

/** After a write: the item's own cache gets the server's answer; every list of that register refetches. */
function useSettle<K extends InventoryKind>(kind: K) {
  const queryClient = useQueryClient();
  return (item: ItemOf<K>) => {
    queryClient.setQueryData(inventoryKeys.detail(kind, item.id), item);
    return queryClient.invalidateQueries({ queryKey: inventoryKeys.lists(kind) });
  };
}

export function useCreateItem<K extends InventoryKind>(kind: K) {
  const settle = useSettle(kind);
  return useMutation({
    mutationFn: (input: unknown) => api.post<ItemOf<K>>(KIND_INFO[kind].apiPath, input),
    onSuccess: settle,
  });
}

export function useUpdateItem<K extends InventoryKind>(kind: K) {
  const settle = useSettle(kind);
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: Record<string, unknown> }) => api.patch<ItemOf<K>>(`${KIND_INFO[kind].apiPath}/${id}`, patch),
    onSuccess: settle,
  });
}

export function useRetireItem<K extends InventoryKind>(kind: K) {
  const settle = useSettle(kind);
  return useMutation({
    mutationFn: ({ id, reason }: { id: number; reason: string }) => api.post<ItemOf<K>>(`${KIND_INFO[kind].apiPath}/${id}/retire`, { reason }),
    onSuccess: settle,
  });
}

/**
 * POST /api/materials/:id/certificates as multipart/form-data (`file`, optional `note`). The JSON
 * client cannot send a file, so this one request uses fetch directly and the same error reader.
 */
async function postCertificate(materialId: number, file: File, note: string): Promise<Certificate> {
  const body = new FormData();
  // Text fields first: the server reads the parts in order.
  if (note.trim()) body.append('note', note.trim());
  body.append('file', file, file.name);
  let res: Response;
  try {
    res = await fetch(`/api/materials/${materialId}/certificates`, { method: 'POST', credentials: 'include', headers: { Accept: 'application/json' }, body });
  } catch {
    throw toApiError(0, undefined);
  }
  const text = await res.text();
  let parsed: unknown;
  try {
    parsed = text ? JSON.parse(text) : undefined;
  } catch {
    parsed = undefined;
  }
  if (!res.ok) throw toApiError(res.status, parsed);
  return parsed as Certificate;
}

export function useUploadCertificate(materialId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, note }: { file: File; note: string }) => postCertificate(materialId, file, note),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: inventoryKeys.certificates(materialId) }),
  });
}
