import { Link } from 'react-router-dom';
import { PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { RunsTable } from '@/features/runs/components/runs-table';

export default function RunListPage() {
  return (
    <>
      <PageHeader
        title="Runs"
        lead="Every analytical run: one plate read on one instrument, carrying specimens of several cases and the control materials. A run's results go forward only when its controls were accepted, or a director released it with a reason."
        actions={
          <Link to={paths.runNew.href()} className="inline-flex items-center rounded-md bg-matrix-700 px-3.5 py-1.5 text-sm font-medium text-white hover:bg-matrix-800">
            New run
          </Link>
        }
      />
      <RunsTable />
    </>
  );
}
