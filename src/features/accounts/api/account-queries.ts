import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '@/lib/api-client';
import { userAccountSchema, userSchema } from '@/schemas/user';

export const accountKeys = {
  all: ['accounts'] as const,
  list: () => [...accountKeys.all, 'list'] as const,
  clinicians: () => [...accountKeys.all, 'clinicians'] as const,
};

export const accountQueries = {
  list: () =>
    queryOptions({
      queryKey: accountKeys.list(),
      queryFn: async () => (await api.get('/api/users', z.object({ items: z.array(userAccountSchema) }))).items,
    }),
  clinicians: () =>
    queryOptions({
      queryKey: accountKeys.clinicians(),
      queryFn: async () => (await api.get('/api/clinicians', z.object({ items: z.array(userSchema) }))).items,
    }),
};
