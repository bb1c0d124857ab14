import { useQuery } from '@tanstack/react-query';
import { PageHeader, ResultsCaution } from '@/components/ui/layout';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { patternText } from '@/features/cases/components/cases-table';
import { CohortView } from '@/features/registry/components/cohort-view';
import { RegistryExportButton } from '@/features/registry/components/export-button';

export default function CohortsPage() {
  const { data: user } = useQuery(sessionQueries.me());
  return (
    <>
      <PageHeader
        title="Cohorts"
        lead="Signed results searched as a group. Each accepted specimen of a signed case counts once, at the case’s current signed version (a corrected report replaces the one it supersedes). The address bar keeps the criteria, so a cohort can be bookmarked or shared."
        // The registry export is the director's (issue 13); the server refuses everyone else with 403.
        actions={user?.role === 'director' ? <RegistryExportButton /> : null}
      />
      <div className="mb-5">
        <ResultsCaution />
      </div>
      <CohortView patternText={patternText} />
    </>
  );
}
