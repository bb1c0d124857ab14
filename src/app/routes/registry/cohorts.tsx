import { PageHeader, ResultsCaution } from '@/components/ui/layout';
import { patternText } from '@/features/cases/components/cases-table';
import { CohortView } from '@/features/registry/components/cohort-view';

export default function CohortsPage() {
  return (
    <>
      <PageHeader
        title="Cohorts"
        lead="Signed results searched as a group. Each accepted specimen of a signed case counts once, at the case’s current signed version (a corrected report replaces the one it supersedes). The address bar keeps the criteria, so a cohort can be bookmarked or shared."
      />
      <div className="mb-5">
        <ResultsCaution />
      </div>
      <CohortView patternText={patternText} />
    </>
  );
}
