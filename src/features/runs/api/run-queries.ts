import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, toQuery } from '@/lib/api-client';
import { controlMaterialSchema } from '@/schemas/qc';
import { openSpecimenListSchema, runDetailSchema, runListSchema, type RunListQuery } from '@/schemas/run';

export const runKeys = {
  all: ['runs'] as const,
  lists: () => [...runKeys.all, 'list'] as const,
  list: (q: RunListQuery) => [...runKeys.lists(), q] as const,
  detail: (id: number) => [...runKeys.all, 'detail', id] as const,
  openSpecimens: () => [...runKeys.all, 'open-specimens'] as const,
  controlMaterials: () => ['control-materials', 'for-runs'] as const,
};

export const runQueries = {
  list: (q: RunListQuery) =>
    queryOptions({
      queryKey: runKeys.list(q),
      queryFn: () => api.get(`/api/runs${toQuery(q)}`, runListSchema),
      placeholderData: keepPreviousData,
    }),
  detail: (id: number) => queryOptions({ queryKey: runKeys.detail(id), queryFn: () => api.get(`/api/runs/${id}`, runDetailSchema) }),
  /** Accepted specimens of open cases, to place on a plate. */
  openSpecimens: () =>
    queryOptions({
      queryKey: runKeys.openSpecimens(),
      queryFn: async () => (await api.get('/api/runs/open-specimens', openSpecimenListSchema)).items,
    }),
  /** Control materials in use (retired ones left out): name, lot, level. */
  controlMaterials: () =>
    queryOptions({
      queryKey: runKeys.controlMaterials(),
      queryFn: async () =>
        (await api.get('/api/control-materials', z.object({ items: z.array(controlMaterialSchema) }))).items.filter((m) => m.retiredAt === null),
    }),
};
