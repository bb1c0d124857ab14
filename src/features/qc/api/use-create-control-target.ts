import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { AssayCode } from '@/schemas/common';
import { controlTargetSchema, type CreateControlTargetBody } from '@/schemas/qc';
import { qcKeys } from './qc-queries';

/** A draft target typed in by a director. */
export function useEnterControlTarget(materialId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateControlTargetBody) => api.post(`/api/control-materials/${materialId}/targets`, body, controlTargetSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: qcKeys.material(materialId) }),
  });
}

/** A draft target computed from the material's first 20 control results for the assay. */
export function useEstablishControlTarget(materialId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (assayCode: AssayCode) =>
      api.post(`/api/control-materials/${materialId}/targets/establish`, { assayCode }, controlTargetSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: qcKeys.material(materialId) }),
  });
}
