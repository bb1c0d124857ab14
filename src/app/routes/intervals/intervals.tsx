import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { IntervalsOverview } from '@/features/reference-intervals/components/intervals-overview';
import { actionLinkClass } from '@/features/reference-intervals/components/action-link';

export default function IntervalsPage() {
  const { data: user } = useQuery(sessionQueries.me());
  const director = user?.role === 'director';
  return (
    <>
      <PageHeader
        title="Reference intervals"
        lead="The laboratory's own limits for each assay, measure, specimen type and age band. Every change is a new version approved by a director; a result keeps the version it was compared with, and its report prints it."
        actions={
          director ? (
            <>
              <Link className={actionLinkClass('secondary')} to={paths.intervalVerify.href()}>
                Verify an adopted interval
              </Link>
              <Link className={actionLinkClass('secondary')} to={paths.intervalNew.href()}>
                New interval
              </Link>
              <Link className={actionLinkClass('primary')} to={paths.intervalDerive.href()}>
                Derive from control data
              </Link>
            </>
          ) : null
        }
      />
      <IntervalsOverview />
    </>
  );
}
