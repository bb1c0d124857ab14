import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { verificationResultSchema, type VerificationRequestBody } from '@/schemas/reference-interval';

/** Stores nothing: the verdict is shown for the director to act on. */
export function useVerifyInterval() {
  return useMutation({
    mutationFn: (input: VerificationRequestBody) =>
      api.post('/api/reference-intervals/verify', input, verificationResultSchema),
  });
}
