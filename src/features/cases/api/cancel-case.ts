import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseDetailSchema, type ReasonInput } from '@/schemas/case';
import { caseKeys, caseQueries } from './case-queries';

export function useCancelCase(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ReasonInput) => api.post(`/api/cases/${id}/cancel`, input, caseDetailSchema),
    onSuccess: async (detail) => {
      qc.setQueryData(caseQueries.detail(id).queryKey, detail);
      await Promise.all([
        qc.invalidateQueries({ queryKey: caseKeys.lists() }),
        qc.invalidateQueries({ queryKey: caseKeys.history(id) }),
      ]);
    },
  });
}
