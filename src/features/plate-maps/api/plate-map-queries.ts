import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, apiRequest } from '@/lib/api-client';
import { storedPlateMapSchema, type ChangePlateMapInput } from '@/schemas/measurement';
import type { CreatePlateMapInput } from '@/schemas/plate';

/** Shared with the upload screen of the measurements feature, which lists the same layouts. */
export const plateMapKeys = { all: ['plate-maps'] as const, list: () => [...plateMapKeys.all, 'list'] as const };

export const plateMapQueries = {
  list: () =>
    queryOptions({
      queryKey: plateMapKeys.list(),
      queryFn: async () => (await api.get('/api/plate-maps', z.object({ items: z.array(storedPlateMapSchema) }))).items,
    }),
};

export function useCreatePlateMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreatePlateMapInput) => api.post('/api/plate-maps', input, storedPlateMapSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: plateMapKeys.all }),
  });
}

export function useChangePlateMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: ChangePlateMapInput }) => api.patch(`/api/plate-maps/${id}`, input, storedPlateMapSchema),
    onSettled: () => qc.invalidateQueries({ queryKey: plateMapKeys.all }),
  });
}

export function useDeletePlateMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version }: { id: number; version: number }) => apiRequest(`/api/plate-maps/${id}?version=${version}`, undefined, { method: 'DELETE' }),
    onSettled: () => qc.invalidateQueries({ queryKey: plateMapKeys.all }),
  });
}
