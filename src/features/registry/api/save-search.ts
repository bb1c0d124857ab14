import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { savedSearchSchema, type SavedSearchInput } from '@/schemas/registry';
import { registryKeys } from './registry-queries';

export function useSaveSearch() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: SavedSearchInput) => api.post('/api/registry/saved-searches', input, savedSearchSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: registryKeys.savedSearches() }),
  });
}
