import { useQuery } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { canOpen, type PathName } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import ForbiddenPage from './forbidden';

/** Shows the page only to roles its route allows; the server enforces the same rule on every API call. */
export function RequireRole({ name, children }: { name: PathName; children: ReactNode }) {
  const { data: user } = useQuery(sessionQueries.me());
  if (!user) return null;
  if (!canOpen(name, user.role)) return <ForbiddenPage />;
  return <>{children}</>;
}
