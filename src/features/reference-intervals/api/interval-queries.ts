import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import {
  controlPreviewSchema,
  controlUploadDetailSchema,
  controlUploadListSchema,
  intervalListSchema,
  storedIntervalSchema,
  type ControlSelection,
} from '@/schemas/reference-interval-api';

export const intervalKeys = {
  all: ['reference-intervals'] as const,
  lists: () => [...intervalKeys.all, 'list'] as const,
  detail: (id: number) => [...intervalKeys.all, 'detail', id] as const,
  history: (id: number) => [...intervalKeys.all, 'history', id] as const,
  controlFiles: () => [...intervalKeys.all, 'controls'] as const,
  controlFile: (id: number) => [...intervalKeys.all, 'controls', id] as const,
  preview: (uploadId: number, selection: ControlSelection) =>
    [...intervalKeys.all, 'preview', uploadId, selection] as const,
};

export const intervalQueries = {
  list: () =>
    queryOptions({
      queryKey: intervalKeys.lists(),
      queryFn: async () => (await api.get('/api/reference-intervals', intervalListSchema)).items,
    }),
  detail: (id: number) =>
    queryOptions({
      queryKey: intervalKeys.detail(id),
      queryFn: () => api.get(`/api/reference-intervals/${id}`, storedIntervalSchema),
    }),
  history: (id: number) =>
    queryOptions({
      queryKey: intervalKeys.history(id),
      queryFn: async () => (await api.get(`/api/reference-intervals/${id}/history`, intervalListSchema)).items,
    }),
  controlFiles: () =>
    queryOptions({
      queryKey: intervalKeys.controlFiles(),
      queryFn: async () => (await api.get('/api/reference-intervals/controls', controlUploadListSchema)).items,
    }),
  controlFile: (id: number) =>
    queryOptions({
      queryKey: intervalKeys.controlFile(id),
      queryFn: () => api.get(`/api/reference-intervals/controls/${id}`, controlUploadDetailSchema),
      staleTime: Infinity,
    }),
  /** A derivation from a stored control file; POST because it takes a body, but it stores nothing. */
  preview: (uploadId: number, selection: ControlSelection) =>
    queryOptions({
      queryKey: intervalKeys.preview(uploadId, selection),
      queryFn: () =>
        api.post(`/api/reference-intervals/controls/${uploadId}/preview`, selection, controlPreviewSchema),
      placeholderData: keepPreviousData,
      staleTime: Infinity,
    }),
};

export const controlFileHref = (uploadId: number) => `/api/reference-intervals/controls/${uploadId}/file`;
