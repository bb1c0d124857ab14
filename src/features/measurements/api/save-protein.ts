import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import {
  proteinCurveResultSchema,
  workupSpecimenSchema,
  type ProteinCurveInput,
  type SaveProteinInput,
} from '@/schemas/measurement';
import { resultsKeyOf, workupKeys } from './workup-queries';

/** The curve and the unknown's value, without saving. */
export function usePreviewProteinCurve() {
  return useMutation({
    mutationFn: (input: ProteinCurveInput) => api.post('/api/protein-curves/preview', input, proteinCurveResultSchema),
  });
}

export function useSaveProtein(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ specimenId, input }: { specimenId: number; input: SaveProteinInput }) =>
      api.put(`/api/specimens/${specimenId}/protein`, input, workupSpecimenSchema),
    onSettled: async () => {
      await qc.invalidateQueries({ queryKey: workupKeys.detail(caseId) });
      await qc.invalidateQueries({ queryKey: resultsKeyOf(caseId) });
    },
  });
}
