import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, planAndFile } from '@/lib/api-client';
import { runImportResultSchema, runPreviewSchema, type RunPlan } from '@/schemas/run';
import { runKeys } from './run-queries';

type Upload = { file: File; plan: RunPlan };

/** Reads the plate file with the run's plan on the server (windows and provisional QC included); stores nothing. */
export function usePreviewRun() {
  return useMutation({ mutationFn: (u: Upload) => api.upload('/api/runs/preview', planAndFile(u), runPreviewSchema) });
}

/** Keeps the file and saves the run: every case's measurements and every control result, all or nothing. */
export function useSaveRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: Upload) => api.upload('/api/runs', planAndFile(u), runImportResultSchema),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: runKeys.all });
    },
  });
}
