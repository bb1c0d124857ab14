import { QueryClientProvider } from '@tanstack/react-query';
import { useState } from 'react';
import { RouterProvider } from 'react-router-dom';
import { createQueryClient } from '@/lib/query-client';
import { sessionKeys } from '@/features/auth/api/session-queries';
import type { SessionUser } from '@/schemas/user';
import { createAppRouter } from './router';

export function App() {
  const [{ queryClient, router }] = useState(() => {
    const holder: { router?: ReturnType<typeof createAppRouter> } = {};
    const queryClient = createQueryClient(
      () => {
        queryClient.setQueryData(sessionKeys.me, null);
        const here = window.location.pathname;
        if (here !== '/sign-in') void holder.router?.navigate(`/sign-in?next=${encodeURIComponent(here)}`);
      },
      // The shell shows the change-password screen instead of the page.
      () => queryClient.setQueryData<SessionUser | null>(sessionKeys.me, (u) => (u ? { ...u, mustChangePassword: true } : u)),
    );
    holder.router = createAppRouter(queryClient);
    return { queryClient, router: holder.router };
  });
  return (
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  );
}
