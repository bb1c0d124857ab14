import { queryOptions } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { outboxSchema } from '@/schemas/report';

export const outboxKeys = {
  all: ['outbox'] as const,
  list: () => [...outboxKeys.all, 'list'] as const,
};

export const outboxQueries = {
  list: () =>
    queryOptions({
      queryKey: outboxKeys.list(),
      queryFn: () => api.get('/api/outbox', outboxSchema),
      // Notices go out just after a signature, and retries follow: look again while the page is open.
      refetchInterval: 5000,
    }),
};
