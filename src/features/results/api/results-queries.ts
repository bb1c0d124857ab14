import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { caseResultsSchema, type SubmitCaseInput } from '@/schemas/results';

export const resultsKeys = {
  all: ['results'] as const,
  detail: (caseId: number) => [...resultsKeys.all, caseId] as const,
};

export const resultsQueries = {
  detail: (caseId: number) =>
    queryOptions({
      queryKey: resultsKeys.detail(caseId),
      queryFn: () => api.get(`/api/cases/${caseId}/results`, caseResultsSchema),
      staleTime: 0,
    }),
};

/** Freezes the results and hands the case to the director. Other views of the case are refreshed. */
export function useSubmitCase(caseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SubmitCaseInput) => api.post(`/api/cases/${caseId}/submit`, input, caseResultsSchema),
    onSuccess: async (results) => {
      qc.setQueryData(resultsKeys.detail(caseId), results);
      // The case detail, list and assay bench of this case all show its state.
      await qc.invalidateQueries({ predicate: (q) => q.queryKey[0] !== 'results' });
    },
  });
}
