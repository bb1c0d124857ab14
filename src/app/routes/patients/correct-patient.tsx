import { useQuery } from '@tanstack/react-query';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { Card, Loading, Notice, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { patientQueries } from '@/features/patients/api/patient-queries';
import { CorrectPatientForm } from '@/features/patients/components/correct-patient-form';

/** Correct a registered patient's details; ?case=<id> links back to the case the user came from. */
export default function CorrectPatientPage() {
  const id = Number(useParams().id);
  const caseId = Number(useSearchParams()[0].get('case'));
  const { data, isPending, error } = useQuery(patientQueries.detail(id));
  const back = Number.isInteger(caseId) && caseId > 0 ? (
    <Link to={paths.caseDetail.href(caseId)} className="text-sm font-medium text-matrix-700 underline">
      Back to the case
    </Link>
  ) : null;
  return (
    <>
      <PageHeader
        title="Correct patient details"
        lead="Fix a mistyped name, lab patient ID, date of birth or sex. Reports already signed keep the details they were signed with, exactly as sent; reports signed from now on print the corrected details. The change and who made it go into the audit trail."
        actions={back}
      />
      <Card>
        {isPending ? <Loading /> : error ? <Notice tone="error">{error.message}</Notice> : <CorrectPatientForm patient={data} />}
      </Card>
    </>
  );
}
