import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseDetailSchema, type UpdateCaseInput } from '@/schemas/case';
import { caseKeys, caseQueries } from './case-queries';

export function useUpdateCase(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateCaseInput) => api.patch(`/api/cases/${id}`, input, caseDetailSchema),
    onSuccess: async (detail) => {
      qc.setQueryData(caseQueries.detail(id).queryKey, detail);
      await Promise.all([
        qc.invalidateQueries({ queryKey: caseKeys.lists() }),
        qc.invalidateQueries({ queryKey: caseKeys.history(id) }),
      ]);
    },
  });
}
