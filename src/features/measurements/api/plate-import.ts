import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, planAndFile } from '@/lib/api-client';
import { plateImportResultSchema, platePreviewSchema, type PlateImportPlan } from '@/schemas/measurement';
import { resultsKeyOf, workupKeys } from './workup-queries';

type Upload = { file: File; plan: PlateImportPlan };

/** Reads the file with the plan (windows included) on the server; stores nothing. */
export function usePreviewPlate(caseId: number) {
  return useMutation({
    mutationFn: (u: Upload) => api.upload(`/api/cases/${caseId}/plate-uploads/preview`, planAndFile(u), platePreviewSchema),
  });
}

/** Keeps the file and saves every well group, all or nothing. */
export function useImportPlate(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: Upload) => api.upload(`/api/cases/${caseId}/plate-uploads`, planAndFile(u), plateImportResultSchema),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: workupKeys.detail(caseId) });
      await qc.invalidateQueries({ queryKey: resultsKeyOf(caseId) });
    },
  });
}
