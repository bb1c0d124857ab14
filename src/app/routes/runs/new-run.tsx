import { PageHeader } from '@/components/ui/layout';
import { NewRun } from '@/features/runs/components/new-run';

export default function NewRunPage() {
  return (
    <>
      <PageHeader
        title="New run"
        lead="Lay out the plate (specimens of open cases, control materials, blanks), read its file, check every group and the controls, then save the whole run at once — or nothing, if anything is wrong."
      />
      <NewRun />
    </>
  );
}
