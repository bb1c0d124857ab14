import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '@/lib/api-client';
import { caseReportsListSchema, inProgressListSchema, reportDetailSchema, reportListSchema } from '@/schemas/report';

export const reportKeys = {
  all: ['reports'] as const,
  list: () => [...reportKeys.all, 'list'] as const,
  byCase: () => [...reportKeys.all, 'by-case'] as const,
  inProgress: () => [...reportKeys.all, 'in-progress'] as const,
  ofCase: (caseId: number) => [...reportKeys.all, 'of-case', caseId] as const,
  detail: (id: number) => [...reportKeys.all, 'detail', id] as const,
};

export const reportQueries = {
  /** Every version the user may read (GET /api/reports, the contract list). */
  list: () => queryOptions({ queryKey: reportKeys.list(), queryFn: () => api.get('/api/reports', reportListSchema) }),
  /** The readable reports grouped by case, with the details a reader needs. */
  byCase: () => queryOptions({ queryKey: reportKeys.byCase(), queryFn: () => api.get('/api/reports/by-case', caseReportsListSchema) }),
  /** The clinician's own referred cases not reported yet: state in words, no results. */
  inProgress: () =>
    queryOptions({
      queryKey: reportKeys.inProgress(),
      queryFn: async () => (await api.get('/api/reports/in-progress', inProgressListSchema)).items,
    }),
  /** Every version of one case (laboratory staff). */
  ofCase: (caseId: number) =>
    queryOptions({
      queryKey: reportKeys.ofCase(caseId),
      queryFn: async () => (await api.get(`/api/cases/${caseId}/reports`, z.object({ items: z.array(reportDetailSchema) }))).items,
    }),
  detail: (id: number) => queryOptions({ queryKey: reportKeys.detail(id), queryFn: () => api.get(`/api/reports/${id}`, reportDetailSchema) }),
};

/** The stored PDF of a report version; the browser downloads it with the session cookie. */
export const reportPdfHref = (id: number) => `/api/reports/${id}/pdf`;

/** The same signed version as an HL7 FHIR R4 Bundle (JSON), for a hospital system's import. */
export const reportFhirHref = (id: number) => `/api/reports/${id}/fhir`;
