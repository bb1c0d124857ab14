import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, toQuery } from '@/lib/api-client';
import { patientSchema } from '@/schemas/case';

export const patientKeys = {
  all: ['patients'] as const,
  searches: () => [...patientKeys.all, 'search'] as const,
  search: (q: string) => [...patientKeys.searches(), q] as const,
  detail: (id: number) => [...patientKeys.all, 'detail', id] as const,
};

export const patientQueries = {
  search: (q: string) =>
    queryOptions({
      queryKey: patientKeys.search(q),
      queryFn: async () => (await api.get(`/api/patients/search${toQuery({ q })}`, z.object({ items: z.array(patientSchema) }))).items,
      enabled: q.trim().length >= 2,
      placeholderData: keepPreviousData,
      staleTime: 10_000,
    }),
  detail: (id: number) => queryOptions({ queryKey: patientKeys.detail(id), queryFn: () => api.get(`/api/patients/${id}`, patientSchema) }),
};
