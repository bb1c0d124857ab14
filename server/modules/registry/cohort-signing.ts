import type { Sequelize, Transaction } from 'sequelize';
import type { CaseDetail } from '@/schemas/case';
import type { ReportDocument } from '@/schemas/report-document';
import type { ReportableResults } from '../reports/build-report-document';
import { ageInYears } from '../results/results.service';
import { writeCohortRows, type CohortSection } from './cohort-rows';

/**
 * At signing (final or corrected), inside the signing transaction: the case's cohort rows become those of the
 * report just stored. Values are copied from the signed document's own result rows, so the cohort holds
 * exactly what was signed.
 */
export async function recordSignedCohort(
  sequelize: Sequelize,
  signed: { reportId: number; version: number; status: 'final' | 'corrected'; document: ReportDocument },
  detail: CaseDetail,
  resultsBySpecimen: ReadonlyMap<number, ReportableResults>,
  transaction: Transaction,
): Promise<void> {
  const sections = detail.specimens.flatMap((s): CohortSection[] => {
    const found = resultsBySpecimen.get(s.id);
    if (!s.accepted || !found || found.results.length === 0) return [];
    return [
      {
        specimenId: s.id,
        label: s.label.trim() || String(s.id),
        type: s.type,
        ageYears: ageInYears(detail.patient.dateOfBirth, new Date(s.collectedAt ?? s.receivedAt)),
        findings: found.findings,
        results: found.results,
      },
    ];
  });
  await writeCohortRows(
    sequelize,
    {
      reportId: signed.reportId,
      caseId: detail.id,
      accession: detail.accession,
      reportVersion: signed.version,
      reportStatus: signed.status,
      sex: detail.patient.sex,
      signedOn: signed.document.report.reportDate,
      sections,
    },
    transaction,
  );
}
