import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { labProfileSchema, type UpdateLabProfileInput } from '@/schemas/lab-profile';

export const labProfileKeys = { profile: ['lab-profile'] as const };

export const labProfileQueries = {
  profile: () => queryOptions({ queryKey: labProfileKeys.profile, queryFn: () => api.get('/api/lab-profile', labProfileSchema) }),
};

export function useSaveLabProfile() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateLabProfileInput) => api.put('/api/lab-profile', input, labProfileSchema),
    onSuccess: (profile) => qc.setQueryData(labProfileKeys.profile, profile),
  });
}
