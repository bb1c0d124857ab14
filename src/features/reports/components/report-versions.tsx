import type { ReportDetail } from '@/schemas/report';
import { reportFhirHref, reportPdfHref } from '../api/report-queries';
import { formatBytes, formatWhen } from '@/utils/format';
import { ChangedValues, UnderAmendmentNote } from './changed-values';
import { ReportStatus } from './report-status';

/**
 * Every signed version of one case, newest first, each with its PDF and the trace of its signature; a note on
 * top while the case is reopened for amendment.
 */
export function ReportVersions({
  reports,
  showInterpretation = false,
  underAmendment = false,
}: {
  reports: ReportDetail[];
  showInterpretation?: boolean;
  underAmendment?: boolean;
}) {
  if (reports.length === 0) return <p className="text-sm text-ink-faint">No report has been signed for this case yet.</p>;
  return (
    <div className="flex flex-col gap-3">
      {underAmendment ? <UnderAmendmentNote /> : null}
      <ol className="flex flex-col gap-3" aria-label="Report versions">
        {reports.map((r) => (
          <li
            key={r.id}
            className={`rounded-md border px-4 py-3 ${r.status === 'superseded' ? 'border-dashed border-paper-line bg-paper-sunk/60' : 'border-paper-line bg-paper-raised'}`}
          >
            <div className="flex flex-wrap items-center justify-between gap-2">
              <div className="flex flex-wrap items-center gap-2">
                <span className="font-semibold text-matrix-900">Version {r.version}</span>
                <ReportStatus status={r.status} supersededBy={r.supersededByVersion} />
                {r.supersedesVersion ? <span className="text-xs text-ink-soft">replaces version {r.supersedesVersion}</span> : null}
              </div>
              <div className="flex flex-wrap items-center gap-2">
                <a
                  className="inline-flex items-center gap-1 rounded-md border border-matrix-300 px-2.5 py-1 text-sm font-medium text-matrix-800 hover:bg-matrix-50"
                  href={reportPdfHref(r.id)}
                  download
                >
                  Download PDF, version {r.version}
                  <span className="text-xs font-normal text-ink-faint">({formatBytes(r.pdfSizeBytes)})</span>
                </a>
                <a
                  className="inline-flex items-center rounded-md border border-paper-line px-2.5 py-1 text-sm text-matrix-800 hover:bg-matrix-50"
                  href={reportFhirHref(r.id)}
                  download
                  title="HL7 FHIR R4 Bundle: the report with its results, for a hospital record system"
                >
                  FHIR (JSON), version {r.version}
                </a>
              </div>
            </div>
            <p className="mt-1 text-sm text-ink-soft">
              Signed {formatWhen(r.signedAt)} by {r.signedBy}, {r.signerTitle}. <span className="italic">“{r.meaning}”</span>
            </p>
            {r.correctionReason ? (
              <dl className="mt-2 grid grid-cols-[9rem_1fr] gap-x-3 gap-y-1 text-sm">
                <dt className="text-ink-faint">Why corrected</dt>
                <dd>{r.correctionReason}</dd>
                <dt className="text-ink-faint">What changed</dt>
                <dd>{r.changesSummary}</dd>
              </dl>
            ) : null}
            <ChangedValues report={r} />
            {r.status === 'superseded' && r.supersededAt ? (
              <p className="mt-1 text-xs text-ink-soft">
                Superseded on {formatWhen(r.supersededAt)}. Kept unchanged for the record; read version {r.supersededByVersion} instead.
              </p>
            ) : null}
            {showInterpretation ? (
              <details className="mt-2 text-sm">
                <summary className="cursor-pointer text-matrix-700">Interpretation as signed</summary>
                <p className="mt-1 whitespace-pre-line text-ink">{r.interpretation}</p>
              </details>
            ) : null}
            <p className="mt-2 break-all font-mono text-[0.68rem] text-ink-faint" title="SHA-256 of the stored PDF file">
              SHA-256 {r.pdfSha256}
            </p>
          </li>
        ))}
      </ol>
    </div>
  );
}
