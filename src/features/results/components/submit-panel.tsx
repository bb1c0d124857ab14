import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/layout';
import { ApiError } from '@/lib/api-client';
import type { CaseResults } from '@/schemas/results';
import { useSubmitCase } from '../api/results-queries';

/**
 * Handing the case to the director: the results are frozen as shown and become read-only, unless a director
 * returns the case with a reason.
 */
export function SubmitPanel({ results }: { results: CaseResults }) {
  const submit = useSubmitCase(results.caseId);
  const [confirming, setConfirming] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const hasResults = results.specimens.some((s) => s.assays.length > 0);
  // With every specimen rejected on receipt there is nothing to assay; the report states the rejection.
  const allRejected = results.specimens.length > 0 && results.specimens.every((s) => !s.accepted);
  const canSubmit = hasResults || allRejected;

  if (results.frozen) {
    return (
      <Notice tone="success">
        Submitted for review. The results above are frozen and read-only; a director can return the case for more work with a reason.
      </Notice>
    );
  }
  if (results.state !== 'in_assay' && !(results.state === 'received' && allRejected)) {
    return <Notice>{hasResults ? 'The case is not in assay, so it cannot be submitted.' : 'Enter assay results first; the case is submitted from here once they are in.'}</Notice>;
  }
  return (
    <div className="flex flex-col gap-3">
      {allRejected ? (
        <p className="text-sm text-ink-soft">
          Every specimen of this case was rejected on receipt. Submitting sends the case to the director, whose signed report will
          state the rejection and its reason so the requester can send a new specimen.
        </p>
      ) : null}
      <p className="text-sm text-ink-soft">
        Check every row and flag above. Submitting freezes these numbers, the intervals they were compared with and the pattern, and sends
        the case to the director. Nothing can be changed afterwards unless the director returns the case.
      </p>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {confirming ? (
        <div className="flex flex-wrap items-center gap-2 rounded-md border border-copper-300 bg-copper-50 px-3 py-2">
          <span className="text-sm">Freeze the results and submit case {results.accession} for review?</span>
          <Button
            disabled={submit.isPending}
            onClick={() =>
              submit.mutate(
                { version: results.caseVersion },
                {
                  onError: (err) => {
                    setConfirming(false);
                    setError(err instanceof ApiError ? err.message : 'The case was not submitted');
                  },
                },
              )
            }
          >
            {submit.isPending ? 'Submitting…' : 'Freeze and submit'}
          </Button>
          <Button variant="quiet" onClick={() => setConfirming(false)}>
            Not yet
          </Button>
        </div>
      ) : (
        <div>
          <Button disabled={!canSubmit} onClick={() => setConfirming(true)}>
            Submit for review…
          </Button>
        </div>
      )}
    </div>
  );
}
