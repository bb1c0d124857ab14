import { Link } from 'react-router-dom';
import { Card, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { NewIntervalForm } from '@/features/reference-intervals/components/new-interval-form';

export default function NewIntervalPage() {
  return (
    <>
      <PageHeader
        title="New reference interval"
        lead={
          <>
            Type in an interval, for instance one adopted from a publication after{' '}
            <Link className="text-matrix-700 underline" to={paths.intervalVerify.href()}>
              verifying it with local samples
            </Link>
            . It is saved as a draft, as the next version of its assay, measure, specimen type and age band.
          </>
        }
      />
      <Card>
        <NewIntervalForm />
      </Card>
    </>
  );
}
