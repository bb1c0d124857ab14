import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api, toQuery } from '@/lib/api-client';
import {
  caseDetailSchema,
  caseHistorySchema,
  caseListSchema,
  rejectionReasonSchema,
  type CaseListQuery,
} from '@/schemas/case';
import { userSchema } from '@/schemas/user';

export const caseKeys = {
  all: ['cases'] as const,
  lists: () => [...caseKeys.all, 'list'] as const,
  list: (q: CaseListQuery) => [...caseKeys.lists(), q] as const,
  details: () => [...caseKeys.all, 'detail'] as const,
  detail: (id: number) => [...caseKeys.details(), id] as const,
  history: (id: number) => [...caseKeys.all, 'history', id] as const,
  clinicians: () => [...caseKeys.all, 'clinicians'] as const,
  rejectionReasons: () => [...caseKeys.all, 'rejection-reasons'] as const,
};

export const caseQueries = {
  list: (q: CaseListQuery) =>
    queryOptions({
      queryKey: caseKeys.list(q),
      queryFn: () => api.get(`/api/cases${toQuery(q)}`, caseListSchema),
      placeholderData: keepPreviousData,
    }),
  detail: (id: number) =>
    queryOptions({ queryKey: caseKeys.detail(id), queryFn: () => api.get(`/api/cases/${id}`, caseDetailSchema) }),
  history: (id: number) =>
    queryOptions({
      queryKey: caseKeys.history(id),
      queryFn: async () => (await api.get(`/api/cases/${id}/history`, caseHistorySchema)).items,
    }),
  /** Active referring clinicians, to pick from (never typed). */
  clinicians: () =>
    queryOptions({
      queryKey: caseKeys.clinicians(),
      queryFn: async () => (await api.get('/api/clinicians', z.object({ items: z.array(userSchema) }))).items,
      staleTime: 5 * 60_000,
    }),
  rejectionReasons: () =>
    queryOptions({
      queryKey: caseKeys.rejectionReasons(),
      queryFn: async () => (await api.get('/api/rejection-reasons', z.object({ items: z.array(rejectionReasonSchema) }))).items,
      staleTime: 5 * 60_000,
    }),
};
