import { queryOptions } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import { userListResponseSchema, type User } from '../../../../shared/schemas/users.ts';
import { userKeys } from './user-keys.ts';

export const userQueries = {
  list: () =>
    queryOptions({
      queryKey: userKeys.lists(),
      queryFn: async (): Promise<User[]> => {
        const body = await api.get<unknown>('/api/users');
        // Parse with the shared schema so contract drift shows up here, not as a blank cell.
        const parsed = userListResponseSchema.safeParse(body);
        if (parsed.success) return parsed.data.items;
        if (import.meta.env.DEV) console.warn('GET /api/users: unexpected shape', parsed.error.issues);
        const items = (body as { items?: User[] } | User[] | null) ?? [];
        return Array.isArray(items) ? items : (items.items ?? []);
      },
    }),
};
