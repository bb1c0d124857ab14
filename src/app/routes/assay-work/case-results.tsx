import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { Card, Loading, Notice, PageHeader, ResultsCaution } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { workupQueries } from '@/features/measurements/api/workup-queries';
import { TraceGallery } from '@/features/measurements/components/trace-gallery';
import { resultsQueries } from '@/features/results/api/results-queries';
import { ResultsView } from '@/features/results/components/results-view';
import { SubmitPanel } from '@/features/results/components/submit-panel';
import { ApiError } from '@/lib/api-client';
import { caseStateLabels } from '@/schemas/case';
import NotFoundPage from '../not-found';

export default function CaseResultsPage() {
  const caseId = Number(useParams().id);
  const { data: results, isPending, error } = useQuery(resultsQueries.detail(caseId));
  const workup = useQuery(workupQueries.detail(caseId));

  if (isPending) return <Loading what="Computing the results" />;
  if (error) return error instanceof ApiError && error.status === 404 ? <NotFoundPage /> : <Notice tone="error">{error.message}</Notice>;

  return (
    <>
      <PageHeader
        title={`Results · ${results.accession}`}
        docTitle={`${results.accession} results`}
        lead={`${caseStateLabels[results.state]} · ${results.frozen ? 'frozen at submission' : 'live'}`}
        actions={
          <>
            <Link className="rounded-md px-3 py-1.5 text-sm text-matrix-700 hover:bg-matrix-50" to={paths.caseDetail.href(caseId)}>
              Case
            </Link>
            <Link className="rounded-md border border-matrix-300 px-3 py-1.5 text-sm text-matrix-800 hover:bg-matrix-50" to={paths.caseAssays.href(caseId)}>
              Assay bench
            </Link>
          </>
        }
      />
      <div className="flex flex-col gap-6">
        <ResultsCaution />
        {results.returnReason && results.state === 'in_assay' ? <Notice tone="error">Returned by the director for more work: {results.returnReason}</Notice> : null}
        <Card title="Results by specimen">
          <ResultsView results={results} />
        </Card>
        <Card title="Submission for review">
          <SubmitPanel results={results} />
        </Card>
        <Card title="Readings behind the results">
          {workup.data ? <TraceGallery workup={workup.data} /> : workup.error ? <Notice tone="error">{workup.error.message}</Notice> : <Loading what="Loading the readings" />}
        </Card>
      </div>
    </>
  );
}
