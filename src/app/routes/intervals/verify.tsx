import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { VerifyForm } from '@/features/reference-intervals/components/verify-form';

export default function VerifyIntervalPage() {
  return (
    <>
      <PageHeader
        title="Verify an adopted interval"
        lead={
          <>
            Before using limits taken from a publication or another laboratory, check them against local samples. If the
            interval is accepted, record it as a{' '}
            <Link className="text-matrix-700 underline" to={paths.intervalNew.href()}>
              new interval
            </Link>{' '}
            and note the verification in its source.
          </>
        }
      />
      <VerifyForm />
    </>
  );
}
