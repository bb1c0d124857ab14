import { useQuery } from '@tanstack/react-query';
import { Card, Loading, Notice, PageHeader } from '@/components/ui/layout';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';
import { LabProfileForm } from '@/features/lab-profile/components/lab-profile-form';

export default function LaboratoryPage() {
  const { data, isPending, error } = useQuery(labProfileQueries.profile());
  return (
    <>
      <PageHeader title="Laboratory profile" lead="The performing laboratory's name, address, telephone and accreditation number, as every report prints them." />
      <Card>
        {isPending ? <Loading /> : error ? <Notice tone="error">{error.message}</Notice> : <LabProfileForm profile={data} />}
      </Card>
    </>
  );
}
