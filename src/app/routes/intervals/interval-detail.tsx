import { Link } from 'react-router-dom';
import { useRecordId } from '@/hooks/use-record-id';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { IntervalDetail } from '@/features/reference-intervals/components/interval-detail';
import NotFoundPage from '../not-found';
import { useApprovalViewer } from '../../use-approval-viewer';

export default function IntervalDetailPage() {
  const numeric = useRecordId();
  const viewer = useApprovalViewer();
  if (numeric === null) return <NotFoundPage />;
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
        viewer={viewer}
      />
    </>
  );
}
