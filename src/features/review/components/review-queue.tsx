import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { Loading, Notice } from '@/components/ui/layout';
import { specimenTypeLabels } from '@/schemas/common';
import { reviewQueries } from '../api/review-queries';
import { waitingFor } from './waiting';
import { TableBox } from '@/components/ui/table-box';

/** Cases awaiting the director's signature: urgent first, then the longest waiting. */
export function ReviewQueue({ caseHref }: { caseHref: (caseId: number) => string }) {
  const { data, isPending, error } = useQuery(reviewQueries.queue());
  if (isPending) return <Loading what="Loading the cases awaiting review" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  if (data.length === 0) return <Notice tone="success">Nothing is waiting for your signature.</Notice>;
  return (
    <TableBox label="Cases awaiting review">
      <table className="w-full text-left text-sm" aria-label="Cases awaiting review">
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            <th className="py-2 pr-3 font-medium">Accession</th>
            <th className="py-2 pr-3 font-medium">Patient</th>
            <th className="py-2 pr-3 font-medium">Specimen</th>
            <th className="py-2 pr-3 font-medium">Waiting</th>
            <th className="py-2 pr-3 font-medium">Pattern read from the results</th>
            <th className="py-2 pr-3 font-medium">Referred by</th>
          </tr>
        </thead>
        <tbody>
          {data.map((item) => (
            <tr key={item.caseId} className="border-b border-paper-line/70 align-top">
              <td className="py-2.5 pr-3">
                <Link className="whitespace-nowrap font-mono font-medium text-matrix-700 underline" to={caseHref(item.caseId)}>
                  {item.accession}
                </Link>
                {item.priority === 'urgent' ? (
                  <span className="ml-2 rounded border border-below/50 bg-below-bg px-1.5 py-0.5 text-xs font-semibold uppercase tracking-wide text-below">
                    Urgent
                  </span>
                ) : null}
              </td>
              <td className="py-2.5 pr-3">{item.patientName}</td>
              <td className="py-2.5 pr-3">{item.specimenTypes.map((t) => specimenTypeLabels[t]).join(', ') || '—'}</td>
              <td className="py-2.5 pr-3 whitespace-nowrap" title={item.submittedAt ? `Submitted by ${item.submittedByName ?? 'unknown'}` : undefined}>
                {waitingFor(item.submittedAt ?? item.receivedAt)}
              </td>
              <td className="py-2.5 pr-3 text-ink">{item.patternSummary ?? <span className="text-ink-faint">No pattern</span>}</td>
              <td className="py-2.5 pr-3 text-ink-soft">{item.referringClinicianName ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}
