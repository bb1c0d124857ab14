import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { RunOverrideInput } from '@/schemas/run';
import { runKeys } from './run-queries';

/** A director releases a run whose controls did not pass: reason and password, kept in the audit trail. */
export function useOverrideRun(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: RunOverrideInput) => api.post(`/api/runs/${id}/override`, input),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: runKeys.all });
    },
  });
}
