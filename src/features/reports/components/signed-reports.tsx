import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { Loading, Notice } from '@/components/ui/layout';
import { reportPdfHref, reportQueries } from '../api/report-queries';
import { formatWhen } from '@/utils/format';
import { ReportStatus } from './report-status';
import { TableBox } from '@/components/ui/table-box';

/** The latest signed versions, for laboratory staff; `caseHref` links each row to the case's own page. */
export function SignedReports({ caseHref, limit = 25 }: { caseHref: (caseId: number) => string; limit?: number }) {
  const { data, isPending, error } = useQuery(reportQueries.list());
  if (isPending) return <Loading what="Loading signed reports" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  if (data.length === 0) return <p className="text-sm text-ink-faint">No report has been signed yet.</p>;
  return (
    <TableBox label="Signed reports">
      <table className="w-full text-left text-sm" aria-label="Signed reports">
        <thead className="border-b border-paper-line text-ink-soft">
          <tr>
            <th className="py-2 pr-3 font-medium">Accession</th>
            <th className="py-2 pr-3 font-medium">Version</th>
            <th className="py-2 pr-3 font-medium">Status</th>
            <th className="py-2 pr-3 font-medium">Signed</th>
            <th className="py-2 pr-3 font-medium">By</th>
            <th className="py-2 pr-3 font-medium">
              <span className="sr-only">File</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {data.slice(0, limit).map((r) => (
            <tr key={r.id} className="border-b border-paper-line/70">
              <td className="py-2 pr-3 font-mono">
                <Link className="text-matrix-700 underline" to={caseHref(r.caseId)}>
                  {r.accession}
                </Link>
              </td>
              <td className="py-2 pr-3">{r.version}</td>
              <td className="py-2 pr-3">
                <ReportStatus status={r.status} />
              </td>
              <td className="py-2 pr-3">{formatWhen(r.signedAt)}</td>
              <td className="py-2 pr-3">{r.signedBy}</td>
              <td className="py-2 pr-3">
                <a className="text-matrix-700 underline" href={reportPdfHref(r.id)} download>
                  PDF
                </a>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}
