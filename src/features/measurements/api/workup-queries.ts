import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '@/lib/api-client';
import { caseWorkupSchema, storedPlateMapSchema } from '@/schemas/measurement';

export const workupKeys = {
  all: ['workup'] as const,
  detail: (caseId: number) => [...workupKeys.all, caseId] as const,
};

/** The case results are cached under this key by the results feature; saving here makes them stale. */
export const resultsKeyOf = (caseId: number) => ['results', caseId] as const;

/** Saved plate layouts, as the upload screen lists them (the plate-maps feature edits them under the same key). */
export const plateLayoutsKey = ['plate-maps', 'list'] as const;

export const workupQueries = {
  detail: (caseId: number) =>
    queryOptions({
      queryKey: workupKeys.detail(caseId),
      queryFn: () => api.get(`/api/cases/${caseId}/workup`, caseWorkupSchema),
    }),
  plateLayouts: () =>
    queryOptions({
      queryKey: plateLayoutsKey,
      queryFn: async () => (await api.get('/api/plate-maps', z.object({ items: z.array(storedPlateMapSchema) }))).items,
    }),
};
