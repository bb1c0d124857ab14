import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { interpretationDraftSchema, type SaveDraftInput } from '@/schemas/report';
import { reviewQueries } from './review-queries';

/** Saves the director's working text (PUT /api/review/:id/draft) into the review data it belongs to. */
export function useSaveDraft() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, input }: { caseId: number; input: SaveDraftInput }) =>
      api.put(`/api/review/${caseId}/draft`, input, interpretationDraftSchema),
    onSuccess: (draft, { caseId }) => {
      qc.setQueryData(reviewQueries.case(caseId).queryKey, (old) => (old ? { ...old, draft } : old));
    },
  });
}
