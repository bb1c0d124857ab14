import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { Loading, Notice, PageHeader } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { sessionQueries } from '@/features/auth/api/session-queries';
import { runQueries } from '@/features/runs/api/run-queries';
import { RunDetailView } from '@/features/runs/components/run-detail';
import { formatWhen } from '@/utils/format';

export default function RunPage() {
  const id = Number(useParams().id);
  const { data: user } = useQuery(sessionQueries.me());
  const { data: run, error, isPending } = useQuery({ ...runQueries.detail(id), enabled: Number.isInteger(id) && id > 0 });
  return (
    <>
      <PageHeader
        title={run ? `Run ${run.runNumber}` : 'Run'}
        lead={
          run ? (
            <>
              Read {formatWhen(run.startedAt)} on {run.instrument} by {run.operator ?? 'an unknown operator'} · {run.plateFormat}-well plate · {run.caseCount}{' '}
              {run.caseCount === 1 ? 'case' : 'cases'}, {run.measurementCount} measurements, {run.controlCount} control results
            </>
          ) : undefined
        }
        actions={
          <Link to={paths.runs.href()} className="text-sm font-medium text-matrix-700 hover:underline">
            All runs
          </Link>
        }
      />
      {error ? <Notice tone="error">{error.message}</Notice> : null}
      {isPending && !error ? <Loading what="Loading the run" /> : null}
      {run ? <RunDetailView run={run} canOverride={user?.role === 'director'} /> : null}
    </>
  );
}
