import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import type { ChangePasswordInput, SessionUser } from '@/schemas/user';
import { sessionKeys } from './session-queries';

/** POST /api/auth/password: the session continues (other sessions of the account end). */
export function useChangePassword(opts: { onDone?: () => void } = {}) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ChangePasswordInput) => api.post('/api/auth/password', input),
    onSuccess: () => {
      qc.setQueryData<SessionUser | null>(sessionKeys.me, (u) => (u ? { ...u, mustChangePassword: false } : u));
      void qc.invalidateQueries({ queryKey: sessionKeys.me });
      opts.onDone?.();
    },
  });
}
