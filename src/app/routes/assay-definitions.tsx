import { PageHeader } from '@/components/ui/layout';
import { DefinitionsList } from '@/features/assay-definitions/components/definitions-list';

export default function AssayDefinitionsPage() {
  return (
    <>
      <PageHeader
        title="Assay definitions"
        lead="Wavelength, extinction coefficient and its source, the expected direction, what is subtracted and the fitting rules of each assay. A change is saved as a new version; results already stored keep the version they were computed with."
      />
      <DefinitionsList />
    </>
  );
}
