import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '@/lib/api-client';
import { storedAssayDefinitionSchema, type CreateAssayDefinitionVersionInput } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';

const listSchema = z.object({ items: z.array(storedAssayDefinitionSchema) });

export const definitionKeys = {
  all: ['assay-definitions'] as const,
  current: () => [...definitionKeys.all, 'current'] as const,
  versions: (code: AssayCode) => [...definitionKeys.all, 'versions', code] as const,
};

export const definitionQueries = {
  current: () =>
    queryOptions({
      queryKey: definitionKeys.current(),
      queryFn: async () => (await api.get('/api/assay-definitions', listSchema)).items,
    }),
  versions: (code: AssayCode) =>
    queryOptions({
      queryKey: definitionKeys.versions(code),
      queryFn: async () => (await api.get(`/api/assay-definitions/${encodeURIComponent(code)}/versions`, listSchema)).items,
    }),
};

export function useCreateDefinitionVersion(code: AssayCode) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateAssayDefinitionVersionInput) =>
      api.post(`/api/assay-definitions/${encodeURIComponent(code)}/versions`, input, storedAssayDefinitionSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: definitionKeys.all }),
  });
}
