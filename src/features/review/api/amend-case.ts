import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseDetailSchema, type CaseDetail } from '@/schemas/case';
import type { AmendCaseInput } from '@/schemas/report';
import { reviewKeys } from './review-queries';

/** Reopens a signed case so its results can be corrected (POST /api/cases/:id/amend). */
export function useAmendCase(opts: { onDone?: (c: CaseDetail) => void | Promise<void> } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, input }: { caseId: number; input: AmendCaseInput }) =>
      api.post(`/api/cases/${caseId}/amend`, input, caseDetailSchema),
    onSuccess: async (c) => {
      await qc.invalidateQueries({ queryKey: reviewKeys.all });
      await opts.onDone?.(c);
    },
  });
}
