import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { specimenSchema, type UpdateSpecimenInput } from '@/schemas/case';
import { caseKeys } from './case-queries';

/** Corrects a specimen or records its rejection. */
export function useChangeSpecimen(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: UpdateSpecimenInput }) => api.patch(`/api/specimens/${id}`, input, specimenSchema),
    onSuccess: async () => {
      await Promise.all([
        qc.invalidateQueries({ queryKey: caseKeys.detail(caseId) }),
        qc.invalidateQueries({ queryKey: caseKeys.history(caseId) }),
        qc.invalidateQueries({ queryKey: caseKeys.lists() }),
      ]);
    },
  });
}
