import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseDetailSchema, type RegisterCaseInput } from '@/schemas/case';
import { caseKeys, caseQueries } from './case-queries';

export function useRegisterCase() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: RegisterCaseInput) => api.post('/api/cases', input, caseDetailSchema),
    onSuccess: async (detail) => {
      qc.setQueryData(caseQueries.detail(detail.id).queryKey, detail);
      await qc.invalidateQueries({ queryKey: caseKeys.lists() });
    },
  });
}
