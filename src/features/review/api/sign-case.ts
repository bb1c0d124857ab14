import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { signResultSchema, type SignCaseInput, type SignResult } from '@/schemas/report';
import { reviewKeys } from './review-queries';

/** Signs a case (POST /api/cases/:id/sign); `onDone` runs after the review data has refetched. */
export function useSignCase(opts: { onDone?: (r: SignResult) => void | Promise<void> } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, input }: { caseId: number; input: SignCaseInput }) =>
      api.post(`/api/cases/${caseId}/sign`, input, signResultSchema),
    onSuccess: async (result) => {
      await qc.invalidateQueries({ queryKey: reviewKeys.all });
      await opts.onDone?.(result);
    },
  });
}
