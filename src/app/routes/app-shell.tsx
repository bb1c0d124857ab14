import { useQuery } from '@tanstack/react-query';
import { useLayoutEffect, useRef, useState } from 'react';
import { NavLink, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { Wordmark } from '@/components/ui/wordmark';
import { canOpen, navigation, paths } from '@/config/paths';
import { useSignOut } from '@/features/auth/api/sign-in';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { roleLabels } from '@/features/accounts/components/role-labels';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';
import { pageTitle } from '@/hooks/use-page-title';
import { setDisplayTimeZone } from '@/utils/format';
import { PasswordRequiredScreen } from './account/password-required';

/**
 * On every change of page: the title falls back to the product name until the page names itself, and (after
 * the first page) focus moves to the page content, so a screen reader starts reading the new page and a
 * keyboard user does not have to tab through the menu again.
 */
function useRouteChange(main: React.RefObject<HTMLElement | null>) {
  const { pathname } = useLocation();
  const first = useRef(true);
  useLayoutEffect(() => {
    document.title = pageTitle();
    if (first.current) {
      first.current = false;
      return;
    }
    main.current?.focus({ preventScroll: true });
    // eslint-disable-next-line react-hooks/exhaustive-deps -- only a change of page counts
  }, [pathname]);
}

export function AppShell() {
  const { data: user } = useQuery(sessionQueries.me());
  // Every time on every page reads in the laboratory's zone; pages wait for it (UTC if the profile fails).
  const profile = useQuery({ ...labProfileQueries.profile(), enabled: Boolean(user && !user.mustChangePassword) });
  const zoneKnown = Boolean(profile.data) || profile.isError;
  if (zoneKnown) setDisplayTimeZone(profile.data?.timeZone ?? 'UTC');
  const navigate = useNavigate();
  const signOut = useSignOut({ onDone: () => navigate(paths.signIn.href()) });
  const [menuOpen, setMenuOpen] = useState(false);
  const main = useRef<HTMLElement>(null);
  useRouteChange(main);
  if (!user) return null;
  if (user.mustChangePassword) return <PasswordRequiredScreen name={user.name} onSignOut={() => signOut.mutate()} />;
  const items = navigation.filter((n) => canOpen(n.name, user.role));

  return (
    <div className="flex min-h-screen flex-col lg:flex-row">
      <a
        href="#main"
        className="sr-only z-50 rounded-md bg-copper-50 px-3 py-2 text-sm font-medium text-matrix-900 focus:not-sr-only focus:fixed focus:left-3 focus:top-3"
      >
        Skip to the page content
      </a>
      <div className="w-full shrink-0 bg-matrix-900 lg:w-rail">
        <nav aria-label="Main" className="flex flex-col px-4 py-3 text-matrix-100 lg:sticky lg:top-0 lg:h-screen lg:py-5">
          <div className="flex items-center justify-between gap-3 lg:mb-8">
            <Wordmark light className="px-2" />
            <button
              type="button"
              className="rounded-md border border-matrix-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-matrix-800 lg:hidden"
              aria-expanded={menuOpen}
              aria-controls="main-menu"
              onClick={() => setMenuOpen((o) => !o)}
            >
              {menuOpen ? 'Close menu' : 'Menu'}
            </button>
          </div>
          <div id="main-menu" className={`${menuOpen ? 'flex' : 'hidden'} mt-2 flex-col lg:mt-0 lg:flex lg:flex-1`}>
            <ul className="flex flex-col gap-0.5">
              {items.map((n) => (
                <li key={n.name}>
                  <NavLink
                    to={paths[n.name].path}
                    end={n.name === 'cases'}
                    onClick={() => setMenuOpen(false)}
                    className={({ isActive }) =>
                      `block rounded-md px-3 py-2 text-sm ${isActive ? 'bg-matrix-700 font-medium text-white' : 'hover:bg-matrix-800 hover:text-white'}`
                    }
                  >
                    {n.label}
                  </NavLink>
                </li>
              ))}
            </ul>
            <div className="mt-2 border-t border-matrix-700 px-2 pt-2 text-sm lg:mt-auto lg:pt-4">
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
          </div>
        </nav>
      </div>
      <main id="main" ref={main} tabIndex={-1} className="min-w-0 flex-1 px-4 py-5 outline-none md:px-8 md:py-7">
        {zoneKnown ? <Outlet /> : null}
      </main>
    </div>
  );
}
