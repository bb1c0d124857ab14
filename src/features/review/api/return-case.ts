import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseDetailSchema, type CaseDetail, type ReasonInput } from '@/schemas/case';
import { reviewKeys } from './review-queries';

/** Sends the case back to the technologists with a reason (POST /api/review/:id/return). */
export function useReturnCase(opts: { onDone?: (c: CaseDetail) => void | Promise<void> } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, input }: { caseId: number; input: ReasonInput }) =>
      api.post(`/api/review/${caseId}/return`, input, caseDetailSchema),
    onSuccess: async (c) => {
      await qc.invalidateQueries({ queryKey: reviewKeys.all });
      await opts.onDone?.(c);
    },
  });
}
