import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, toQuery } from '@/lib/api-client';
import type { AssayCode } from '@/schemas/common';
import { controlChartSchema, controlMaterialDetailSchema, controlMaterialSchema, qcRuleSelectionSchema } from '@/schemas/qc';

export const qcKeys = {
  all: ['qc'] as const,
  materials: () => [...qcKeys.all, 'materials'] as const,
  material: (id: number) => [...qcKeys.all, 'material', id] as const,
  chart: (id: number, assay: AssayCode) => [...qcKeys.all, 'chart', id, assay] as const,
  rules: () => [...qcKeys.all, 'rules'] as const,
};

const materialListSchema = z.object({ items: z.array(controlMaterialSchema) });

export const qcQueries = {
  materials: () =>
    queryOptions({
      queryKey: qcKeys.materials(),
      queryFn: async () => (await api.get('/api/control-materials', materialListSchema)).items,
    }),
  material: (id: number) =>
    queryOptions({
      queryKey: qcKeys.material(id),
      queryFn: () => api.get(`/api/control-materials/${id}`, controlMaterialDetailSchema),
    }),
  chart: (id: number, assay: AssayCode) =>
    queryOptions({
      queryKey: qcKeys.chart(id, assay),
      queryFn: () => api.get(`/api/control-materials/${id}/chart${toQuery({ assay })}`, controlChartSchema),
    }),
  rules: () =>
    queryOptions({
      queryKey: qcKeys.rules(),
      queryFn: () => api.get('/api/qc/rules', qcRuleSelectionSchema),
    }),
};
