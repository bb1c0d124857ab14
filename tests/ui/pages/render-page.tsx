import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { configure, render } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';

// The real server answers these pages (password hashing, PDF rendering) on a shared, busy machine: findBy* and
// waitFor wait up to 45 s for what the user would see.
configure({ asyncUtilTimeout: 45_000 });

/** One page at one address, with a fresh query cache and React Router, as the app mounts it (without the shell). */
export function renderPage(routePath: string, url: string, Page: React.ComponentType) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  const router = createMemoryRouter([{ path: routePath, Component: Page }, { path: '*', Component: () => null }], {
    initialEntries: [url],
  });
  return render(
    <QueryClientProvider client={client}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}
