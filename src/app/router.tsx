import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, redirect, type RouteObject } from 'react-router-dom';
import { landingFor, paths, type PathName } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { AppShell } from './routes/app-shell';
import ForbiddenPage from './routes/forbidden';
import { RequireRole } from './routes/require-role';
import { RouteError } from './routes/route-error';
import { StartingUp } from './routes/starting-up';

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

/** Nothing to show: the index route's loader sends every user to their own landing page. */
function Redirecting() {
  return null;
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
      hydrateFallbackElement: <StartingUp />,
    },
    {
      path: '/',
      loader: requireSession,
      element: <AppShell />,
      errorElement: <RouteError />,
      // Shown while the first page's session check and code load (without it React Router warns on every load).
      hydrateFallbackElement: <StartingUp />,
      children: [
        {
          index: true,
          loader: async ({ request }) => {
            const user = await requireSession({ request });
            return redirect(landingFor[user.role]);
          },
          // The loader always redirects; a component keeps React Router from warning about an empty leaf route.
          Component: Redirecting,
        },
        page('cases', () => import('./routes/cases/case-list')),
        page('caseNew', () => import('./routes/cases/register-case')),
        page('caseDetail', () => import('./routes/cases/case-detail')),
        page('caseHistory', () => import('./routes/cases/case-history')),
        page('caseAssays', () => import('./routes/assay-work/case-assays')),
        page('caseResults', () => import('./routes/assay-work/case-results')),
        page('patientCorrect', () => import('./routes/patients/correct-patient')),
        page('plateMaps', () => import('./routes/assay-work/plate-layouts')),
        page('runs', () => import('./routes/runs/run-list')),
        page('runNew', () => import('./routes/runs/new-run')),
        page('runDetail', () => import('./routes/runs/run-page')),
        page('calculator', () => import('./routes/rate-check')),
        page('assayDefinitions', () => import('./routes/assay-definitions')),
        page('intervals', () => import('./routes/intervals/intervals')),
        page('intervalNew', () => import('./routes/intervals/new-interval')),
        page('intervalDerive', () => import('./routes/intervals/derive')),
        page('intervalVerify', () => import('./routes/intervals/verify')),
        page('intervalDetail', () => import('./routes/intervals/interval-detail')),
        page('qc', () => import('./routes/qc/qc')),
        page('qcMaterial', () => import('./routes/qc/control-material')),
        page('cohorts', () => import('./routes/registry/cohorts')),
        page('adminUsers', () => import('./routes/admin/accounts')),
        page('adminLab', () => import('./routes/admin/laboratory')),
        page('review', () => import('./routes/review/review-queue')),
        page('reviewCase', () => import('./routes/review/review-case')),
        page('myReports', () => import('./routes/my-reports/my-reports')),
        page('adminOutbox', () => import('./routes/admin/outbox')),
        page('accountPassword', () => import('./routes/account/change-password')),
        { path: paths.forbidden.path, Component: ForbiddenPage },
        { path: '*', lazy: () => import('./routes/not-found').then((m) => ({ Component: m.default })) },
      ],
    },
  ]);
}
