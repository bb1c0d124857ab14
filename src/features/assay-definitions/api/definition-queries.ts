import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '@/lib/api-client';
import {
  assayDefinitionListSchema,
  storedAssayDefinitionSchema,
  type CreateAssayDefinitionVersionInput,
  type WithdrawAssayDefinitionInput,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';

const listSchema = z.object({ items: z.array(storedAssayDefinitionSchema) });

export const definitionKeys = {
  all: ['assay-definitions'] as const,
  current: () => [...definitionKeys.all, 'current'] as const,
  versions: (code: AssayCode) => [...definitionKeys.all, 'versions', code] as const,
};

export const definitionQueries = {
  current: () =>
    queryOptions({
      queryKey: definitionKeys.current(),
      queryFn: async () => (await api.get('/api/assay-definitions', listSchema)).items,
    }),
  /** The versions in force and the drafts awaiting a second director (one request). */
  withDrafts: () =>
    queryOptions({
      queryKey: [...definitionKeys.all, 'with-drafts'] as const,
      queryFn: () => api.get('/api/assay-definitions', assayDefinitionListSchema),
    }),
  versions: (code: AssayCode) =>
    queryOptions({
      queryKey: definitionKeys.versions(code),
      queryFn: async () => (await api.get(`/api/assay-definitions/${encodeURIComponent(code)}/versions`, listSchema)).items,
    }),
};

const versionPath = (code: AssayCode, version: number, action: string) =>
  `/api/assay-definitions/${encodeURIComponent(code)}/versions/${version}/${action}`;

/** A second director puts a draft in force (or its drafter, where the laboratory allows self-approval). */
export function useApproveDefinitionVersion(code: AssayCode) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (version: number) => api.post(versionPath(code, version, 'approve'), {}, storedAssayDefinitionSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: definitionKeys.all }),
  });
}

export function useWithdrawDefinitionVersion(code: AssayCode) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ version, input }: { version: number; input: WithdrawAssayDefinitionInput }) =>
      api.post(versionPath(code, version, 'withdraw'), input, storedAssayDefinitionSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: definitionKeys.all }),
  });
}

export function useCreateDefinitionVersion(code: AssayCode) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateAssayDefinitionVersionInput) =>
      api.post(`/api/assay-definitions/${encodeURIComponent(code)}/versions`, input, storedAssayDefinitionSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: definitionKeys.all }),
  });
}
