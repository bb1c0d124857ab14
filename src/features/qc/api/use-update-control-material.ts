import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { controlMaterialDetailSchema, type PatchControlMaterialBody } from '@/schemas/qc';
import { qcKeys } from './qc-queries';

/** Edits a material or retires it (retired: true) with the version the user saw. */
export function useUpdateControlMaterial() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, body }: { id: number; body: PatchControlMaterialBody }) =>
      api.patch(`/api/control-materials/${id}`, body, controlMaterialDetailSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: qcKeys.all }),
  });
}
