import { queryOptions } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { reviewCaseSchema, reviewQueueSchema } from '@/schemas/report';

export const reviewKeys = {
  all: ['review'] as const,
  queue: () => [...reviewKeys.all, 'queue'] as const,
  case: (caseId: number) => [...reviewKeys.all, 'case', caseId] as const,
};

export const reviewQueries = {
  queue: () =>
    queryOptions({ queryKey: reviewKeys.queue(), queryFn: async () => (await api.get('/api/review', reviewQueueSchema)).items }),
  case: (caseId: number) =>
    queryOptions({ queryKey: reviewKeys.case(caseId), queryFn: () => api.get(`/api/review/${caseId}`, reviewCaseSchema) }),
};
