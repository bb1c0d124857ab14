import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { ResultsCaution } from '@/components/ui/layout';
import { paths } from '@/config/paths';
import { resultsQueries } from '../api/results-queries';

/**
 * A short account of the assay work for the case detail page: how many results, the pattern, and the way to the
 * assay bench and the results page.
 */
export function WorkupSummaryPanel({ caseId }: { caseId: number }) {
  const { data, isPending, error } = useQuery(resultsQueries.detail(caseId));
  if (isPending) return <p className="text-sm text-ink-faint">Loading the assay work…</p>;
  if (error) return <p className="text-sm text-below">{error.message}</p>;
  const count = data.specimens.reduce((n, s) => n + s.assays.reduce((m, a) => m + a.replicates.length, 0), 0);
  const headlines = data.specimens.filter((s) => s.pattern).map((s) => `${s.label}: ${s.pattern!.headline}`);
  return (
    <div className="flex flex-col gap-2 text-sm" data-testid="workup-summary">
      <p>
        {count === 0 ? 'No assay result yet.' : `${count} measurement${count === 1 ? '' : 's'} saved.`}{' '}
        {data.frozen ? 'Results frozen at submission.' : count > 0 ? 'Results are computed live until the case is submitted.' : ''}
      </p>
      {headlines.length ? (
        <>
          <p className="text-ink-soft">{headlines.join(' · ')}</p>
          <ResultsCaution />
        </>
      ) : null}
      {data.returnReason && data.state === 'in_assay' ? <p className="text-below">Returned by the director: {data.returnReason}</p> : null}
      <p className="flex gap-4">
        <Link className="font-medium text-matrix-700 underline" to={paths.caseAssays.href(caseId)}>
          Assay bench
        </Link>
        <Link className="font-medium text-matrix-700 underline" to={paths.caseResults.href(caseId)}>
          Results{data.state === 'in_assay' ? ' and submission' : ''}
        </Link>
      </p>
    </div>
  );
}
