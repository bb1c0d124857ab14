import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { Loading, Notice } from '@/components/ui/layout';
import { specimenTypeLabels } from '@/schemas/common';
import type { CaseReports } from '@/schemas/report';
import { reportFhirHref, reportPdfHref, reportQueries } from '../api/report-queries';
import { formatDay, formatWhen } from '@/utils/format';
import { ChangedValues, UnderAmendmentNote } from './changed-values';
import { ReportStatus } from './report-status';

function matches(group: CaseReports, q: string): boolean {
  const needle = q.trim().toLowerCase();
  if (!needle) return true;
  return [group.patientName, group.accession, group.reports[0]?.labPatientId ?? ''].some((s) => s.toLowerCase().includes(needle));
}

function CaseCard({ group }: { group: CaseReports }) {
  const [current, ...earlier] = group.reports;
  if (!current) return null;
  return (
    <article className="rounded-card border border-paper-line bg-paper-raised p-5 shadow-card" aria-label={`Accession ${group.accession}`}>
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h2 className="text-lg font-semibold text-matrix-900">{group.patientName}</h2>
          <p className="text-sm text-ink-soft">
            Born {formatDay(group.dateOfBirth)} · Lab ID {current.labPatientId} · Accession{' '}
            <span className="font-mono text-ink">{group.accession}</span>
            {current.specimenType ? ` · ${specimenTypeLabels[current.specimenType]}` : ''}
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-2">
          <a
            className="inline-flex items-center rounded-md bg-matrix-700 px-3.5 py-1.5 text-sm font-medium text-white hover:bg-matrix-800"
            // A 44 px touch target for a phone (set here: the utility class for it is not generated for this folder).
            style={{ minHeight: '2.75rem' }}
            href={reportPdfHref(current.id)}
            download
          >
            Download report (PDF)
          </a>
          <a
            className="inline-flex items-center rounded-md border border-matrix-300 px-3 py-1.5 text-sm text-matrix-800 hover:bg-matrix-50"
            href={reportFhirHref(current.id)}
            download
            title="HL7 FHIR R4 Bundle: the report with its results, for a hospital record system"
          >
            FHIR (JSON)
          </a>
        </div>
      </header>
      {group.underAmendment ? (
        <div className="mt-3">
          <UnderAmendmentNote />
        </div>
      ) : null}
      <div className="mt-3 flex flex-wrap items-center gap-2 text-sm">
        <span className="font-medium">Version {current.version}</span>
        <ReportStatus status={current.status} />
        <span className="text-ink-soft">
          signed {formatWhen(current.signedAt)} by {current.signedBy}
        </span>
      </div>
      {current.correctionReason ? (
        <p className="mt-2 rounded-md border border-copper-300 bg-copper-50 px-3 py-2 text-sm text-copper-700">
          <strong className="font-semibold">Corrected report. </strong>
          {current.correctionReason} <span className="text-ink-soft">What changed: {current.changesSummary}</span>
        </p>
      ) : null}
      <ChangedValues report={current} />
      {current.patternSummary ? <p className="mt-3 text-sm text-ink">{current.patternSummary}</p> : null}
      <details className="mt-2 text-sm">
        <summary className="cursor-pointer text-matrix-700">Interpretation</summary>
        <p className="mt-1 whitespace-pre-line">{current.interpretation}</p>
      </details>
      {earlier.length > 0 ? (
        <div className="mt-4 border-t border-paper-line pt-3">
          <h3 className="text-sm font-medium text-ink-soft">Earlier versions, kept for the record</h3>
          <ul className="mt-1 flex flex-col gap-1 text-sm">
            {earlier.map((r) => (
              <li key={r.id} className="flex flex-wrap items-center gap-2">
                <span>Version {r.version}</span>
                <ReportStatus status={r.status} supersededBy={r.supersededByVersion} />
                <span className="text-ink-faint">signed {formatWhen(r.signedAt)}</span>
                <a className="text-matrix-700 underline" href={reportPdfHref(r.id)} download>
                  PDF of version {r.version}
                </a>
                <a className="text-matrix-700 underline" href={reportFhirHref(r.id)} download>
                  FHIR (JSON) of version {r.version}
                </a>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </article>
  );
}

/** The referring clinician's reports, one card per case, the version in force first. */
export function MyReports() {
  const { data, isPending, error } = useQuery(reportQueries.byCase());
  const [q, setQ] = useState('');
  const shown = useMemo(() => (data ?? []).filter((g) => matches(g, q)), [data, q]);
  if (isPending) return <Loading what="Loading your reports" />;
  if (error) return <Notice tone="error">{error.message}</Notice>;
  if (data.length === 0) {
    return <Notice>No signed reports yet. You will get an e-mail when a report for a patient you referred is ready.</Notice>;
  }
  return (
    <div className="flex flex-col gap-4">
      <div className="max-w-sm">
        <label htmlFor="report-filter" className="text-sm font-medium text-ink-soft">
          Find a patient or accession number
        </label>
        <input
          id="report-filter"
          type="search"
          className="mt-1 w-full rounded-md border border-paper-line bg-paper-raised px-2.5 py-1.5 text-sm"
          value={q}
          onChange={(e) => setQ(e.target.value)}
        />
      </div>
      {shown.length === 0 ? <p className="text-sm text-ink-faint">Nothing matches “{q}”.</p> : null}
      {shown.map((g) => (
        <CaseCard key={g.caseId} group={g} />
      ))}
    </div>
  );
}
