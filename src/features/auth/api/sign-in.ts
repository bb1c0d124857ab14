import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { meResponseSchema, type LoginInput, type User } from '@/schemas/user';
import { sessionKeys } from './session-queries';

export function useSignIn(opts: { onDone?: (user: User) => void } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post('/api/auth/login', input, meResponseSchema),
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(sessionKeys.me, user);
      opts.onDone?.(user);
    },
  });
}

export function useSignOut(opts: { onDone?: () => void } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post('/api/auth/logout', {}),
    onSettled: () => {
      qc.clear();
      qc.setQueryData(sessionKeys.me, null);
      opts.onDone?.();
    },
  });
}
