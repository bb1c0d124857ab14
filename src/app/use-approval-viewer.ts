import { useQuery } from '@tanstack/react-query';
import type { ApprovalViewer } from '@/components/ui/second-director';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';

/**
 * Who is looking at a draft, for pages where directors approve versions (intervals, control targets): null for
 * anyone but a director, otherwise their id and whether the laboratory lets a director approve their own drafts.
 */
export function useApprovalViewer(): ApprovalViewer | null {
  const { data: user } = useQuery(sessionQueries.me());
  const isDirector = user?.role === 'director';
  const { data: profile } = useQuery({ ...labProfileQueries.profile(), enabled: isDirector });
  return isDirector && user ? { userId: user.id, selfApprovalAllowed: profile?.allowSelfApproval ?? false } : null;
}
