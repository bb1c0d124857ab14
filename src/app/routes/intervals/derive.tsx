import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { DeriveWorkbench } from '@/features/reference-intervals/components/derive-workbench';

export default function DeriveIntervalPage() {
  return (
    <>
      <PageHeader
        title="Derive from control data"
        lead={
          <>
            Compute an interval from the laboratory&apos;s own control subjects, compare two methods on the same values, and
            save the one you choose as a draft for approval. Nothing is stored until you save.{' '}
            <Link className="text-matrix-700 underline" to={paths.intervals.href()}>
              Back to the intervals
            </Link>
          </>
        }
      />
      <DeriveWorkbench />
    </>
  );
}
