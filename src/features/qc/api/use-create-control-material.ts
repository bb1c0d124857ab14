import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { controlMaterialDetailSchema, type CreateControlMaterialBody } from '@/schemas/qc';
import { qcKeys } from './qc-queries';

export function useCreateControlMaterial() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateControlMaterialBody) => api.post('/api/control-materials', body, controlMaterialDetailSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: qcKeys.materials() }),
  });
}
