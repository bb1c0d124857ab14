import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { registryKeys } from './registry-queries';

export function useDeleteSearch() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.del(`/api/registry/saved-searches/${id}`),
    onSuccess: () => qc.invalidateQueries({ queryKey: registryKeys.savedSearches() }),
  });
}
