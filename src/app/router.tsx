import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, redirect, type RouteObject } from 'react-router-dom';
import { landingFor, paths, type PathName } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { AppShell } from './routes/app-shell';
import ForbiddenPage from './routes/forbidden';
import { RequireRole } from './routes/require-role';
import { RouteError } from './routes/route-error';

/** A lazily loaded page behind the role check of its entry in paths. */
function page(name: PathName, load: () => Promise<{ default: React.ComponentType }>): RouteObject {
  return {
    path: paths[name].path,
    lazy: async () => {
      const { default: Page } = await load();
      return {
        Component: () => (
          <RequireRole name={name}>
            <Page />
          </RequireRole>
        ),
      };
    },
  };
}

export function createAppRouter(queryClient: QueryClient) {
  const requireSession = async ({ request }: { request: Request }) => {
    const user = await queryClient.ensureQueryData(sessionQueries.me());
    if (!user) {
      const url = new URL(request.url);
      throw redirect(`${paths.signIn.href()}?next=${encodeURIComponent(url.pathname + url.search)}`);
    }
    return user;
  };

  return createBrowserRouter([
    {
      path: paths.signIn.path,
      lazy: () => import('./routes/sign-in').then((m) => ({ Component: m.default })),
      errorElement: <RouteError />,
    },
    {
      path: '/',
      loader: requireSession,
      element: <AppShell />,
      errorElement: <RouteError />,
      children: [
        {
          index: true,
          loader: async ({ request }) => {
            const user = await requireSession({ request });
            return redirect(landingFor[user.role]);
          },
        },
        page('calculator', () => import('./routes/rate-check')),
        page('assayDefinitions', () => import('./routes/assay-definitions')),
        page('adminUsers', () => import('./routes/admin/accounts')),
        page('adminLab', () => import('./routes/admin/laboratory')),
        { path: paths.forbidden.path, Component: ForbiddenPage },
        { path: '*', lazy: () => import('./routes/not-found').then((m) => ({ Component: m.default })) },
      ],
    },
  ]);
}
