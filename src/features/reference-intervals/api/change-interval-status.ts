import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { storedIntervalSchema, type EditDraftBody, type StoredInterval } from '@/schemas/reference-interval-api';
import { intervalKeys, intervalQueries } from './interval-queries';

function useAfterStatusChange() {
  const qc = useQueryClient();
  return async (changed: StoredInterval) => {
    qc.setQueryData(intervalQueries.detail(changed.id).queryKey, changed);
    // Approval may also have closed the previous version, so every interval query is refreshed.
    await qc.invalidateQueries({ queryKey: intervalKeys.all });
  };
}

export function useApproveInterval() {
  const after = useAfterStatusChange();
  return useMutation({
    mutationFn: ({ id, revision }: { id: number; revision: number }) =>
      api.post(`/api/reference-intervals/${id}/approve`, { revision }, storedIntervalSchema),
    onSuccess: after,
  });
}

/** The drafter's changes to a draft before approval. */
export function useEditDraft() {
  const after = useAfterStatusChange();
  return useMutation({
    mutationFn: ({ id, body }: { id: number; body: EditDraftBody }) =>
      api.patch(`/api/reference-intervals/${id}`, body, storedIntervalSchema),
    onSuccess: after,
  });
}

export function useRetireInterval() {
  const after = useAfterStatusChange();
  return useMutation({
    mutationFn: ({ id, revision, reason }: { id: number; revision: number; reason: string }) =>
      api.post(`/api/reference-intervals/${id}/retire`, { revision, reason }, storedIntervalSchema),
    onSuccess: after,
  });
}
