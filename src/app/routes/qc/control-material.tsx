import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';
import { MaterialDetail } from '@/features/qc/components/material-detail';
import NotFoundPage from '../not-found';

export default function ControlMaterialPage() {
  const { id } = useParams();
  const { data: user } = useQuery(sessionQueries.me());
  const isDirector = user?.role === 'director';
  const { data: profile } = useQuery({ ...labProfileQueries.profile(), enabled: isDirector });
  const numeric = Number(id);
  if (!Number.isInteger(numeric) || numeric < 1) return <NotFoundPage />;
  return (
    <>
      <PageHeader
        title="Control material"
        lead={
          <Link className="text-matrix-700 underline" to={paths.qc.href()}>
            ← Quality control
          </Link>
        }
      />
      <MaterialDetail
        key={numeric}
        id={numeric}
        viewer={isDirector && user ? { userId: user.id, selfApprovalAllowed: profile?.allowSelfApproval ?? false } : null}
      />
    </>
  );
}
