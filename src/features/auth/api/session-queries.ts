import { queryOptions } from '@tanstack/react-query';
import { api, ApiError } from '@/lib/api-client';
import { meResponseSchema, type SessionUser } from '@/schemas/user';

export const sessionKeys = { me: ['session', 'me'] as const };

/** The signed-in user, or null when there is no session. */
export const sessionQueries = {
  me: () =>
    queryOptions({
      queryKey: sessionKeys.me,
      queryFn: async (): Promise<SessionUser | null> => {
        try {
          return (await api.get('/api/auth/me', meResponseSchema)).user;
        } catch (err) {
          if (err instanceof ApiError && err.status === 401) return null;
          throw err;
        }
      },
      staleTime: 5 * 60_000,
    }),
};
