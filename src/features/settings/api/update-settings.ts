import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type { LabSettings, UpdateLabSettingsInput } from '../../../../shared/schemas/settings.ts';
import { settingsKeys } from '../../calculate/api/settings-queries.ts';

/** PUT /api/settings (admin): any subset; every changed key is audited by the server. */
export function useUpdateSettings() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateLabSettingsInput) => api.put<LabSettings>('/api/settings', input),
    onSuccess: (saved) => queryClient.setQueryData(settingsKeys.detail(), saved),
  });
}
