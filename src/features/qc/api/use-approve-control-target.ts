import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { controlTargetSchema } from '@/schemas/qc';
import { qcKeys } from './qc-queries';

/** Puts a draft target in force; the previous approved version of that material and assay is retired. */
export function useApproveControlTarget() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (targetId: number) => api.post(`/api/control-targets/${targetId}/approve`, {}, controlTargetSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: qcKeys.all }),
  });
}
