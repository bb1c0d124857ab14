import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { controlUploadResponseSchema } from '@/schemas/reference-interval-api';
import { intervalKeys, intervalQueries } from './interval-queries';

export function useUploadControls() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (file: File) => {
      const form = new FormData();
      form.append('file', file);
      return api.upload('/api/reference-intervals/controls', form, controlUploadResponseSchema);
    },
    onSuccess: async ({ alreadyStored: _stored, ...detail }) => {
      qc.setQueryData(intervalQueries.controlFile(detail.id).queryKey, detail);
      await qc.invalidateQueries({ queryKey: intervalKeys.controlFiles() });
    },
  });
}
