import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { qcRuleSelectionSchema, type PutQcRulesBody } from '@/schemas/qc';
import { qcKeys } from './qc-queries';

export function useSaveQcRules() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: PutQcRulesBody) => api.put('/api/qc/rules', body, qcRuleSelectionSchema),
    onSuccess: (saved) => qc.setQueryData(qcKeys.rules(), saved),
  });
}
