import type { CaseReports, InProgressCase, ReportDetail, ReportListItem } from '@/schemas/report';
import type { User } from '@/schemas/user';
import { forbidden, notFound } from '../../lib/errors';
import { listInProgressOfClinician } from './in-progress.repository';
import * as repo from './reports.repository';

/*
 * Who reads which report (product brief; CLIA 42 CFR 493.1291(f): results released only to authorised
 * persons): laboratory staff (technologists and directors) read every report; a clinician reads only the
 * reports of cases they referred; administrators read none. A clinician asking for any other report gets the
 * same 404 as for a report that does not exist, so its existence is not revealed.
 */

type Scope = { referringClinicianId?: number };

function scopeOf(user: User): Scope {
  if (user.role === 'technologist' || user.role === 'director') return {};
  if (user.role === 'clinician') return { referringClinicianId: user.id };
  throw forbidden('Administrators manage accounts, not reports');
}

function mayRead(user: User, report: repo.StoredReport): boolean {
  const scope = scopeOf(user);
  return scope.referringClinicianId === undefined || report.referringClinicianId === scope.referringClinicianId;
}

async function details(reports: repo.StoredReport[]): Promise<ReportDetail[]> {
  const ids = reports.flatMap((r) => [r.supersedesReportId, r.supersededByReportId]).filter((x): x is number => x !== null);
  const versions = await repo.versionsOf([...new Set(ids)]);
  return reports.map((r) => repo.toDetail(r, versions));
}

/** GET /api/reports: every version the user may read, newest signature first. */
export async function listReportsFor(user: User): Promise<ReportListItem[]> {
  return (await repo.listReports(scopeOf(user))).map(repo.toListItem);
}

/** GET /api/reports/in-progress: the clinician's own referred cases not reported yet (no results). */
export async function listInProgressFor(user: User): Promise<InProgressCase[]> {
  if (user.role !== 'clinician') throw forbidden('This list is the referring clinician\'s own');
  return listInProgressOfClinician(user.id);
}

/** The readable reports grouped by case, cases with the newest signature first, versions newest first. */
export async function listCaseReportsFor(user: User): Promise<CaseReports[]> {
  const all = await details(await repo.listReports(scopeOf(user)));
  const byCase = new Map<number, ReportDetail[]>();
  for (const r of all) byCase.set(r.caseId, [...(byCase.get(r.caseId) ?? []), r]);
  const amending = await repo.casesUnderAmendment([...byCase.keys()]);
  return [...byCase.values()].map((versions) => {
    const sorted = [...versions].sort((a, b) => b.version - a.version);
    const newest = sorted[0]!;
    return {
      caseId: newest.caseId,
      accession: newest.accession,
      patientName: newest.patientName,
      dateOfBirth: newest.dateOfBirth,
      referringClinicianName: newest.referringClinicianName,
      underAmendment: amending.has(newest.caseId),
      reports: sorted,
    };
  });
}

export async function getReportFor(user: User, id: number): Promise<ReportDetail> {
  const report = await repo.findReport(id);
  if (!report || !mayRead(user, report)) throw notFound('Report', id);
  return (await details([report]))[0]!;
}

/** The stored PDF, exactly as rendered at signing, with the report it belongs to (same readers as the report). */
export async function getReportPdfFor(
  user: User,
  id: number,
): Promise<{ pdf: Buffer; sha256: string; filename: string; report: repo.StoredReport }> {
  const report = await repo.findReport(id);
  if (!report || !mayRead(user, report)) throw notFound('Report', id);
  const file = await repo.findReportPdf(id);
  if (!file) throw notFound('Report', id);
  const safeAccession = report.accession.replace(/[^A-Za-z0-9._-]+/g, '-');
  return { pdf: file.pdf, sha256: file.pdfSha256, filename: `report-${safeAccession}-v${report.version}.pdf`, report };
}

/** Every version of one case's report (laboratory pages). */
export async function listReportsOfCase(caseId: number): Promise<ReportDetail[]> {
  return details(await repo.listReports({ caseId }));
}
