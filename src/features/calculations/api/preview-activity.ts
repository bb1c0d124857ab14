import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { calculationResultSchema, type CalculationRequest } from '@/schemas/assay';

/** Runs one measurement through the engine on the server; nothing is stored. */
export function usePreviewActivity() {
  return useMutation({
    mutationFn: (request: CalculationRequest) => api.post('/api/calculations/activity', request, calculationResultSchema),
  });
}
