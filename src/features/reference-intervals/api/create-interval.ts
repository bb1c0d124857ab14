import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { storedIntervalSchema, type DraftFromControlsInput, type NewIntervalInput, type StoredInterval } from '@/schemas/reference-interval-api';
import { intervalKeys, intervalQueries } from './interval-queries';

async function storeDraft(qc: ReturnType<typeof useQueryClient>, created: StoredInterval) {
  qc.setQueryData(intervalQueries.detail(created.id).queryKey, created);
  await qc.invalidateQueries({ queryKey: intervalKeys.lists() });
}

/** A draft typed in by a director. */
export function useCreateInterval() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: NewIntervalInput) => api.post('/api/reference-intervals', input, storedIntervalSchema),
    onSuccess: (created) => storeDraft(qc, created),
  });
}

/** A draft derived on the server from a stored control file. */
export function useCreateDraftFromControls() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ uploadId, input }: { uploadId: number; input: DraftFromControlsInput }) =>
      api.post(`/api/reference-intervals/controls/${uploadId}/draft`, input, storedIntervalSchema),
    onSuccess: (created) => storeDraft(qc, created),
  });
}
