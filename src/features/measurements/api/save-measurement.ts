import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, apiRequest } from '@/lib/api-client';
import { calculationResultSchema } from '@/schemas/assay';
import { measurementSchema, type CreateMeasurementInput, type UpdateMeasurementInput } from '@/schemas/measurement';
import { resultsKeyOf, workupKeys } from './workup-queries';

export const measurementPreviewSchema = z.object({
  result: calculationResultSchema,
  definitionId: z.number().int(),
  definitionVersion: z.number().int(),
  proteinMgPerMl: z.number(),
});
export type MeasurementPreview = z.infer<typeof measurementPreviewSchema>;

/** After a change on the bench: the workup and the case results are read again. */
export function useRefreshWorkup(caseId: number) {
  const qc = useQueryClient();
  return async () => {
    await qc.invalidateQueries({ queryKey: workupKeys.detail(caseId) });
    await qc.invalidateQueries({ queryKey: resultsKeyOf(caseId) });
  };
}

/** What a new measurement would give; stores nothing. */
export function usePreviewMeasurement(caseId: number) {
  return useMutation({
    mutationFn: (input: CreateMeasurementInput) => api.post(`/api/cases/${caseId}/measurements/preview`, input, measurementPreviewSchema),
  });
}

export function useCreateMeasurement(caseId: number) {
  const refresh = useRefreshWorkup(caseId);
  return useMutation({
    mutationFn: (input: CreateMeasurementInput) => api.post(`/api/cases/${caseId}/measurements`, input, measurementSchema),
    onSuccess: refresh,
  });
}

export function useUpdateMeasurement(caseId: number) {
  const refresh = useRefreshWorkup(caseId);
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: UpdateMeasurementInput }) => api.put(`/api/measurements/${id}`, input, measurementSchema),
    onSettled: refresh,
  });
}

export function useDeleteMeasurement(caseId: number) {
  const refresh = useRefreshWorkup(caseId);
  return useMutation({
    mutationFn: ({ id, version }: { id: number; version: number }) =>
      apiRequest(`/api/measurements/${id}?version=${version}`, undefined, { method: 'DELETE' }),
    onSettled: refresh,
  });
}
