import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { mailDeliverySchema } from '@/schemas/report';
import { outboxKeys } from './outbox-queries';

/** Asks for a notice that was given up on to be sent again (administrators). */
export function useRetryNotice() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.post(`/api/outbox/notices/${id}/retry`, {}, mailDeliverySchema),
    onSettled: () => qc.invalidateQueries({ queryKey: outboxKeys.all }),
  });
}
