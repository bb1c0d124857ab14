import { useQuery } from '@tanstack/react-query';
import { PageHeader } from '@/components/ui/layout';
import { DefinitionsList } from '@/features/assay-definitions/components/definitions-list';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';

export default function AssayDefinitionsPage() {
  const { data: user } = useQuery(sessionQueries.me());
  const isDirector = user?.role === 'director';
  const { data: profile } = useQuery({ ...labProfileQueries.profile(), enabled: isDirector });
  return (
    <>
      <PageHeader
        title="Assay definitions"
        lead="Wavelength, extinction coefficient and its source, the expected direction, what is subtracted and the fitting rules of each assay. A change is saved as a draft of a new version and is used only once a second director approves it; results already stored keep the version they were computed with."
      />
      <DefinitionsList
        viewer={isDirector && user ? { userId: user.id, selfApprovalAllowed: profile?.allowSelfApproval ?? false } : null}
      />
    </>
  );
}
