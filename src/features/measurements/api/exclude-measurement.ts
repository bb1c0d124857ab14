import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { measurementSchema, type ExcludeMeasurementInput, type IncludeMeasurementInput } from '@/schemas/measurement';
import { useRefreshWorkup } from './save-measurement';

/** Leaves a replicate out of the calculations, with the reason; it stays listed. */
export function useExcludeMeasurement(caseId: number) {
  const refresh = useRefreshWorkup(caseId);
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: ExcludeMeasurementInput }) =>
      api.post(`/api/measurements/${id}/exclude`, input, measurementSchema),
    onSettled: refresh,
  });
}

/** Counts an excluded replicate again. */
export function useIncludeMeasurement(caseId: number) {
  const refresh = useRefreshWorkup(caseId);
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: IncludeMeasurementInput }) =>
      api.post(`/api/measurements/${id}/include`, input, measurementSchema),
    onSettled: refresh,
  });
}
