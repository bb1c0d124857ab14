import { Link } from 'react-router-dom';
import { useRecordId } from '@/hooks/use-record-id';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { MaterialDetail } from '@/features/qc/components/material-detail';
import NotFoundPage from '../not-found';
import { useApprovalViewer } from '../../use-approval-viewer';

export default function ControlMaterialPage() {
  const numeric = useRecordId();
  const viewer = useApprovalViewer();
  if (numeric === null) return <NotFoundPage />;
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
        viewer={viewer}
      />
    </>
  );
}
