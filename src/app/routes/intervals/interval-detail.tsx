import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';
import { IntervalDetail } from '@/features/reference-intervals/components/interval-detail';
import NotFoundPage from '../not-found';

export default function IntervalDetailPage() {
  const { id } = useParams();
  const { data: user } = useQuery(sessionQueries.me());
  const isDirector = user?.role === 'director';
  const { data: profile } = useQuery({ ...labProfileQueries.profile(), enabled: isDirector });
  const numeric = Number(id);
  if (!Number.isInteger(numeric) || numeric < 1) return <NotFoundPage />;
  return (
    <>
      <PageHeader
        title="Reference interval"
        lead={
          <Link className="text-matrix-700 underline" to={paths.intervals.href()}>
            ← All reference intervals
          </Link>
        }
      />
      <IntervalDetail
        key={numeric}
        id={numeric}
        viewer={isDirector && user ? { userId: user.id, selfApprovalAllowed: profile?.allowSelfApproval ?? false } : null}
      />
    </>
  );
}
