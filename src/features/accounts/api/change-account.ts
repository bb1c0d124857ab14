import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import {
  userAccountSchema,
  type CreateUserInput,
  type ResetPasswordInput,
  type UpdateUserInput,
} from '@/schemas/user';
import { accountKeys } from './account-queries';

export function useCreateAccount() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateUserInput) => api.post('/api/users', input, userAccountSchema),
    onSuccess: () => qc.invalidateQueries({ queryKey: accountKeys.all }),
  });
}

export function useUpdateAccount() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: UpdateUserInput }) =>
      api.patch(`/api/users/${id}`, input, userAccountSchema),
    onSettled: () => qc.invalidateQueries({ queryKey: accountKeys.all }),
  });
}

export function useResetPassword() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: ResetPasswordInput }) =>
      api.post(`/api/users/${id}/password`, input),
    onSuccess: () => qc.invalidateQueries({ queryKey: accountKeys.all }),
  });
}
