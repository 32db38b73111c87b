import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';
import type {
  CreateLabelTemplateInput,
  LabelPrintCreated,
  LabelPrintInput,
  LabelTemplate,
  UpdateLabelTemplateInput,
} from '../../../../shared/schemas/printing.ts';
import { printingKeys } from './printing-keys.ts';

/** POST /api/preparations/:key/label-prints (chemist, technician): records the print; the PDF is at pdfUrl. */
export function useRecordLabelPrint(key: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: LabelPrintInput) => api.post<LabelPrintCreated>(`/api/preparations/${encodeURIComponent(key)}/label-prints`, input),
    onSettled: () => queryClient.invalidateQueries({ queryKey: printingKeys.history(key) }),
  });
}

export function useCreateLabelTemplate() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateLabelTemplateInput) => api.post<LabelTemplate>('/api/label-templates', input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: printingKeys.templates() }),
  });
}

export function useUpdateLabelTemplate(id: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateLabelTemplateInput) => api.patch<LabelTemplate>(`/api/label-templates/${id}`, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: printingKeys.templates() }),
  });
}
