import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import {
  cohortPageSchema,
  cohortPlotsSchema,
  savedSearchListSchema,
  type CohortCriteria,
  type CohortFilter,
} from '@/schemas/registry';
import { cohortQueryString } from '../utils/cohort-params';

const withQuery = (path: string, f: CohortFilter) => {
  const qs = cohortQueryString(f);
  return qs ? `${path}?${qs}` : path;
};

export const registryKeys = {
  all: ['registry'] as const,
  cohorts: () => [...registryKeys.all, 'cohort'] as const,
  cohort: (f: CohortFilter) => [...registryKeys.cohorts(), f] as const,
  plots: (f: CohortCriteria) => [...registryKeys.all, 'plots', f] as const,
  savedSearches: () => [...registryKeys.all, 'saved-searches'] as const,
};

export const registryQueries = {
  cohort: (f: CohortFilter) =>
    queryOptions({
      queryKey: registryKeys.cohort(f),
      queryFn: () => api.get(withQuery('/api/registry/cohort', f), cohortPageSchema),
      placeholderData: keepPreviousData,
    }),
  plots: (f: CohortCriteria) =>
    queryOptions({
      queryKey: registryKeys.plots(f),
      queryFn: () => api.get(withQuery('/api/registry/cohort/plots', f), cohortPlotsSchema),
      placeholderData: keepPreviousData,
    }),
  savedSearches: () =>
    queryOptions({
      queryKey: registryKeys.savedSearches(),
      queryFn: async () => (await api.get('/api/registry/saved-searches', savedSearchListSchema)).items,
    }),
};
