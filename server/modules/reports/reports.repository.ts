import { Op, type Transaction } from 'sequelize';
import type { SpecimenType } from '@/schemas/common';
import type { ReportDocument } from '@/schemas/report-document';
import type { InterpretationDraft, ReportDetail, ReportListItem, ReportListStatus } from '@/schemas/report';
import { CaseModel } from '../cases/case.model';
import { SpecimenModel } from '../specimens/specimen.model';
import { UserModel } from '../users/user.model';
import { InterpretationDraftModel, ReportModel } from './report.model';

/** Every column but the PDF bytes: lists never load the files. */
const WITHOUT_PDF = { exclude: ['pdf'] as string[] };

export type NewReport = {
  caseId: number;
  version: number;
  kind: 'final' | 'corrected';
  specimenId: number | null;
  patternSummary: string | null;
  interpretation: string;
  meaning: string;
  signedById: number;
  signerName: string;
  signerTitle: string;
  signedAt: Date;
  supersedesReportId: number | null;
  correctionReason: string | null;
  changesSummary: string | null;
  document: string;
  documentSha256: string;
  pdf: Buffer;
  pdfSha256: string;
};

/** A stored report and what its listing needs from the case, without the PDF bytes. */
export type StoredReport = {
  id: number;
  caseId: number;
  accession: string;
  referringClinicianId: number;
  version: number;
  kind: 'final' | 'corrected';
  status: ReportListStatus;
  specimenId: number | null;
  specimenType: SpecimenType | null;
  specimenLabel: string | null;
  patternSummary: string | null;
  interpretation: string;
  meaning: string;
  signedById: number;
  signerName: string;
  signerTitle: string;
  signedAt: Date;
  supersedesReportId: number | null;
  supersededByReportId: number | null;
  supersededAt: Date | null;
  correctionReason: string | null;
  changesSummary: string | null;
  document: ReportDocument;
  documentSha256: string;
  pdfSha256: string;
  pdfSizeBytes: number;
};

type CaseBits = { accession: string; referringClinicianId: number };
type SpecimenBits = { type: SpecimenType; label: string };

function toStored(row: ReportModel, c: CaseBits, s: SpecimenBits | undefined): StoredReport {
  return {
    id: row.id,
    caseId: row.caseId,
    accession: c.accession,
    referringClinicianId: c.referringClinicianId,
    version: row.version,
    kind: row.kind,
    status: row.supersededByReportId !== null ? 'superseded' : row.kind,
    specimenId: row.specimenId,
    specimenType: s?.type ?? null,
    specimenLabel: s?.label ?? null,
    patternSummary: row.patternSummary,
    interpretation: row.interpretation,
    meaning: row.meaning,
    signedById: row.signedById,
    signerName: row.signerName,
    signerTitle: row.signerTitle,
    signedAt: row.signedAt,
    supersedesReportId: row.supersedesReportId,
    supersededByReportId: row.supersededByReportId,
    supersededAt: row.supersededAt,
    correctionReason: row.correctionReason,
    changesSummary: row.changesSummary,
    document: JSON.parse(row.document) as ReportDocument,
    documentSha256: row.documentSha256,
    pdfSha256: row.pdfSha256,
    pdfSizeBytes: row.pdfSizeBytes,
  };
}

async function withContext(rows: ReportModel[], transaction?: Transaction): Promise<StoredReport[]> {
  if (rows.length === 0) return [];
  const caseIds = [...new Set(rows.map((r) => r.caseId))];
  const specimenIds = [...new Set(rows.map((r) => r.specimenId).filter((x): x is number => x !== null))];
  const [cases, specimens] = await Promise.all([
    CaseModel.findAll({ where: { id: caseIds }, attributes: ['id', 'accession', 'referringClinicianId'], transaction }),
    specimenIds.length
      ? SpecimenModel.findAll({ where: { id: specimenIds }, attributes: ['id', 'type', 'label'], transaction })
      : Promise.resolve([] as SpecimenModel[]),
  ]);
  const caseById = new Map(cases.map((c) => [c.id, { accession: c.accession, referringClinicianId: c.referringClinicianId }]));
  const specimenById = new Map(specimens.map((s) => [s.id, { type: s.type as SpecimenType, label: s.label }]));
  return rows.map((r) => toStored(r, caseById.get(r.caseId)!, r.specimenId !== null ? specimenById.get(r.specimenId) : undefined));
}

export async function insertReport(data: NewReport, transaction: Transaction): Promise<number> {
  const row = await ReportModel.create({ ...data, pdfSizeBytes: data.pdf.length }, { transaction });
  return row.id;
}

export async function findReport(id: number, transaction?: Transaction): Promise<StoredReport | null> {
  const row = await ReportModel.findByPk(id, { attributes: WITHOUT_PDF, transaction });
  if (!row) return null;
  return (await withContext([row], transaction))[0]!;
}

export async function findReportPdf(id: number): Promise<{ pdf: Buffer; pdfSha256: string } | null> {
  const row = await ReportModel.findByPk(id, { attributes: ['id', 'pdf', 'pdfSha256'] });
  return row ? { pdf: row.pdf, pdfSha256: row.pdfSha256 } : null;
}

/**
 * Reports, newest signature first. `referringClinicianId` keeps only the cases that clinician referred
 * (the clinician's view); `caseId` keeps one case's versions.
 */
export async function listReports(
  filter: { referringClinicianId?: number; caseId?: number; limit?: number } = {},
): Promise<StoredReport[]> {
  const where: Record<string | symbol, unknown> = {};
  if (filter.caseId !== undefined) where.caseId = filter.caseId;
  if (filter.referringClinicianId !== undefined) {
    const own = await CaseModel.findAll({ where: { referringClinicianId: filter.referringClinicianId }, attributes: ['id'] });
    where.caseId = filter.caseId !== undefined ? (own.some((c) => c.id === filter.caseId) ? filter.caseId : -1) : { [Op.in]: own.map((c) => c.id) };
  }
  const rows = await ReportModel.findAll({
    where,
    attributes: WITHOUT_PDF,
    order: [
      ['signedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: filter.limit,
  });
  return withContext(rows);
}

/** The version in force for a case: the newest one not superseded. */
export async function findCurrentReportOfCase(caseId: number, transaction?: Transaction): Promise<StoredReport | null> {
  const row = await ReportModel.findOne({
    where: { caseId, supersededByReportId: null },
    attributes: WITHOUT_PDF,
    order: [['version', 'DESC']],
    transaction,
  });
  return row ? (await withContext([row], transaction))[0]! : null;
}

/** Marks a version superseded by a newer one; false when someone else superseded it first. */
export async function markSuperseded(id: number, byReportId: number, at: Date, transaction: Transaction): Promise<boolean> {
  const [count] = await ReportModel.update(
    { supersededByReportId: byReportId, supersededAt: at },
    { where: { id, supersededByReportId: null }, transaction },
  );
  return count === 1;
}

/** Which of these cases are reopened for amendment now (their signed reports get an on-screen note). */
export async function casesUnderAmendment(caseIds: number[]): Promise<Set<number>> {
  if (caseIds.length === 0) return new Set();
  const rows = await CaseModel.findAll({ where: { id: caseIds, amendReason: { [Op.ne]: null } }, attributes: ['id'] });
  return new Set(rows.map((r) => r.id));
}

/** Versions of the reports by id, to print "supersedes version N" without another query per row. */
export async function versionsOf(ids: number[]): Promise<Map<number, number>> {
  if (ids.length === 0) return new Map();
  const rows = await ReportModel.findAll({ where: { id: ids }, attributes: ['id', 'version'] });
  return new Map(rows.map((r) => [r.id, r.version]));
}

export function toListItem(r: StoredReport): ReportListItem {
  return {
    id: r.id,
    caseId: r.caseId,
    accession: r.accession,
    version: r.version,
    status: r.status,
    signedAt: r.signedAt.toISOString(),
    signedBy: r.signerName,
  };
}

/**
 * The first specimen's type from a stored signed document. Documents signed before reports carried every
 * specimen have one top-level `specimen` instead of `specimens`; both shapes are read (stored rows are never
 * rewritten). Only patient and case fields are read otherwise, and those are the same in both shapes.
 */
export function documentSpecimenType(doc: ReportDocument): SpecimenType | null {
  const legacy = doc as unknown as { specimen?: { type?: SpecimenType } };
  return doc.specimens?.[0]?.specimen.type ?? legacy.specimen?.type ?? null;
}

export function toDetail(r: StoredReport, versions: Map<number, number>): ReportDetail {
  const doc = r.document;
  return {
    ...toListItem(r),
    patientName: doc.patient.name,
    labPatientId: doc.patient.labPatientId,
    dateOfBirth: doc.patient.dateOfBirth,
    specimenType: r.specimenType ?? documentSpecimenType(doc),
    specimenLabel: r.specimenLabel,
    referringClinicianName: doc.case.referringClinicianName,
    patternSummary: r.patternSummary,
    interpretation: r.interpretation,
    meaning: r.meaning,
    signerTitle: r.signerTitle,
    correctionReason: r.correctionReason,
    changesSummary: r.changesSummary,
    supersedesVersion: r.supersedesReportId !== null ? (versions.get(r.supersedesReportId) ?? null) : null,
    supersededByVersion: r.supersededByReportId !== null ? (versions.get(r.supersededByReportId) ?? null) : null,
    supersededAt: r.supersededAt ? r.supersededAt.toISOString() : null,
    changedValues: r.document.report?.changedValues ?? [],
    runs: r.document.methods?.runs ?? [],
    pdfSha256: r.pdfSha256,
    pdfSizeBytes: r.pdfSizeBytes,
    documentSha256: r.documentSha256,
  };
}

/* ---------------------------------------------------------------- interpretation drafts */

export async function findDraft(caseId: number, transaction?: Transaction): Promise<InterpretationDraft | null> {
  const row = await InterpretationDraftModel.findByPk(caseId, { transaction });
  if (!row) return null;
  const by = row.updatedById !== null ? await UserModel.findByPk(row.updatedById, { attributes: ['name'], transaction }) : null;
  return { interpretation: row.text, version: row.version, updatedAt: row.updatedAt.toISOString(), updatedByName: by?.name ?? null };
}

/**
 * Writes the draft if it is still at `expectedVersion` (null: there must be no draft yet). False when someone
 * else saved in between.
 */
export async function saveDraftIfVersion(
  caseId: number,
  expectedVersion: number | null,
  text: string,
  userId: number,
  transaction: Transaction,
): Promise<boolean> {
  if (expectedVersion === null) {
    const existing = await InterpretationDraftModel.findByPk(caseId, { transaction });
    if (existing) return false;
    await InterpretationDraftModel.create({ caseId, text, updatedById: userId }, { transaction });
    return true;
  }
  const [count] = await InterpretationDraftModel.update(
    { text, updatedById: userId, version: expectedVersion + 1 },
    { where: { caseId, version: expectedVersion }, transaction },
  );
  return count === 1;
}
