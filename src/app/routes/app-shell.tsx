import { useQuery } from '@tanstack/react-query';
import { NavLink, Outlet, useNavigate } from 'react-router-dom';
import { Wordmark } from '@/components/ui/wordmark';
import { canOpen, navigation, paths } from '@/config/paths';
import { useSignOut } from '@/features/auth/api/sign-in';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { roleLabels } from '@/features/accounts/components/role-labels';
import { PasswordRequiredScreen } from './account/password-required';

export function AppShell() {
  const { data: user } = useQuery(sessionQueries.me());
  const navigate = useNavigate();
  const signOut = useSignOut({ onDone: () => navigate(paths.signIn.href()) });
  if (!user) return null;
  if (user.mustChangePassword) return <PasswordRequiredScreen name={user.name} onSignOut={() => signOut.mutate()} />;
  const items = navigation.filter((n) => canOpen(n.name, user.role));

  return (
    <div className="flex min-h-screen flex-col md:flex-row">
      <div className="w-full shrink-0 bg-matrix-900 md:w-rail">
      <nav aria-label="Main" className="flex flex-col px-4 py-3 text-matrix-100 md:sticky md:top-0 md:h-screen md:py-5">
        <Wordmark light className="mb-2 px-2 md:mb-8" />
        <ul className="flex flex-wrap gap-0.5 md:flex-col">
          {items.map((n) => (
            <li key={n.name}>
              <NavLink
                to={paths[n.name].path}
                end={n.name === 'cases'}
                className={({ isActive }) =>
                  `block rounded-md px-3 py-2 text-sm ${isActive ? 'bg-matrix-700 font-medium text-white' : 'hover:bg-matrix-800 hover:text-white'}`
                }
              >
                {n.label}
              </NavLink>
            </li>
          ))}
        </ul>
        <div className="mt-2 border-t border-matrix-700 px-2 pt-2 text-sm md:mt-auto md:pt-4">
          <p className="font-medium text-white" data-testid="signed-in-name">
            {user.name}
          </p>
          <p className="text-xs text-matrix-300" data-testid="signed-in-role">
            {roleLabels[user.role]}
          </p>
          <div className="mt-3 flex gap-4 text-xs">
            <NavLink to={paths.accountPassword.path} className="text-copper-300 underline hover:text-white">
              Change password
            </NavLink>
            <button type="button" className="text-copper-300 underline hover:text-white" onClick={() => signOut.mutate()}>
              Sign out
            </button>
          </div>
        </div>
      </nav>
      </div>
      <main className="min-w-0 flex-1 px-4 py-5 md:px-8 md:py-7">
        <Outlet />
      </main>
    </div>
  );
}
