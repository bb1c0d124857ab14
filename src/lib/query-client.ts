import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';

/**
 * Signed-out detection lives here, not in the API client: a 401 anywhere sends the user to sign in, and a 403
 * PASSWORD_CHANGE_REQUIRED anywhere brings up the screen where they choose their own password.
 */
export function createQueryClient(
  onUnauthenticated: () => void = () => {},
  onPasswordChangeRequired: () => void = () => {},
): QueryClient {
  const handle = (err: unknown) => {
    if (err instanceof ApiError && err.status === 401 && err.code === 'UNAUTHENTICATED') onUnauthenticated();
    if (err instanceof ApiError && err.status === 403 && err.code === 'PASSWORD_CHANGE_REQUIRED') onPasswordChangeRequired();
  };
  return new QueryClient({
    queryCache: new QueryCache({ onError: handle }),
    mutationCache: new MutationCache({ onError: handle }),
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        retry: (count, err) => !(err instanceof ApiError && err.status < 500) && count < 2,
        refetchOnWindowFocus: false,
      },
    },
  });
}
