import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { plateImportResultSchema, platePreviewSchema, type PlateImportPlan } from '@/schemas/measurement';
import { resultsKeyOf, workupKeys } from './workup-queries';

type Upload = { file: File; plan: PlateImportPlan };

function formOf({ file, plan }: Upload): FormData {
  const form = new FormData();
  form.append('plan', JSON.stringify(plan));
  form.append('file', file, file.name);
  return form;
}

/** Reads the file with the plan (windows included) on the server; stores nothing. */
export function usePreviewPlate(caseId: number) {
  return useMutation({
    mutationFn: (u: Upload) => api.upload(`/api/cases/${caseId}/plate-uploads/preview`, formOf(u), platePreviewSchema),
  });
}

/** Keeps the file and saves every well group, all or nothing. */
export function useImportPlate(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: Upload) => api.upload(`/api/cases/${caseId}/plate-uploads`, formOf(u), plateImportResultSchema),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: workupKeys.detail(caseId) });
      await qc.invalidateQueries({ queryKey: resultsKeyOf(caseId) });
    },
  });
}
