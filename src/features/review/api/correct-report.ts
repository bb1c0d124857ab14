import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { signResultSchema, type CorrectReportInput, type SignResult } from '@/schemas/report';
import { reviewKeys } from './review-queries';

/** Issues a corrected report (POST /api/cases/:id/correct). */
export function useCorrectReport(opts: { onDone?: (r: SignResult) => void | Promise<void> } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, input }: { caseId: number; input: CorrectReportInput }) =>
      api.post(`/api/cases/${caseId}/correct`, input, signResultSchema),
    onSuccess: async (result) => {
      await qc.invalidateQueries({ queryKey: reviewKeys.all });
      await opts.onDone?.(result);
    },
  });
}
