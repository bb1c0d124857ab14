import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { specimenSchema, type ReceiveSpecimenInput } from '@/schemas/case';
import { caseKeys } from './case-queries';

export function useReceiveSpecimen(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ReceiveSpecimenInput) => api.post(`/api/cases/${caseId}/specimens`, input, specimenSchema),
    onSuccess: async () => {
      await Promise.all([
        qc.invalidateQueries({ queryKey: caseKeys.detail(caseId) }),
        qc.invalidateQueries({ queryKey: caseKeys.history(caseId) }),
        qc.invalidateQueries({ queryKey: caseKeys.lists() }),
      ]);
    },
  });
}
