import { useQuery } from '@tanstack/react-query';
import { PageHeader } from '@/components/ui/layout';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { MaterialsOverview } from '@/features/qc/components/materials-overview';
import { RuleSwitches } from '@/features/qc/components/rule-switches';

export default function QualityControlPage() {
  const { data: user } = useQuery(sessionQueries.me());
  const isDirector = user?.role === 'director';
  return (
    <>
      <PageHeader
        title="Quality control"
        lead="Control materials with their target means and SDs per assay, and the rules every analytical run is judged by. Open a material for its targets and its Levey–Jennings charts."
      />
      <div className="flex flex-col gap-6">
        <MaterialsOverview isDirector={isDirector} />
        <RuleSwitches canEdit={isDirector} />
      </div>
    </>
  );
}
