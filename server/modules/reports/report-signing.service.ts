import { createHash } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import type { CaseDetail } from '@/schemas/case';
import {
  DEFAULT_CORRECTION_MEANING,
  DEFAULT_SIGNATURE_MEANING,
  type CorrectReportInput,
  type SignCaseInput,
  type SignResult,
} from '@/schemas/report';
import type { User } from '@/schemas/user';
import { verifyPassword } from '../../auth/password';
import { admitRightPassword, countWrongPassword, refuseIfLocked } from '../../auth/lockout';
import { AppError, conflict, forbidden, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { transitionCase } from '../cases/case-state';
import { loadCaseDetail } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { getLabProfile } from '../lab-profile/lab-profile.service';
import { prepareReportNotice, queueReportNotice, type NoticeDeps, type PreparedNotice } from '../mail/notices.service';
import { nudgeNoticeWorkers } from '../mail/notice-worker';
import { getCaseResults } from '../results/results.service';
import { findUserById } from '../users/users.repository';
import { recordSignedCohort } from '../registry/cohort-signing';
import { proposeInterpretation } from '../review/draft-interpretation';
import {
  buildReportDocument,
  chooseReportedSpecimen,
  reportPatternSummary,
  type ReportableResults,
  type VersionInput,
} from './build-report-document';
import * as repo from './reports.repository';
import { toReportableResults } from './results-adapter';

export type SigningOptions = {
  /** The demo seed signs without a typed password; every HTTP route checks it. */
  checkPassword?: boolean;
  /** Queue the clinician's notice with the signature (default true). */
  notify?: boolean;
  now?: Date;
};

export const sha256Hex = (data: Buffer | string): string => createHash('sha256').update(data).digest('hex');

const badSignaturePassword = () =>
  new AppError('BAD_CREDENTIALS', 'The password is not correct. Nothing was signed.');

/**
 * The second identity component of an electronic signature: the signer types their password again. A wrong one
 * counts toward the same lock-out as sign-in (423 once locked), so it cannot be guessed without limit.
 */
export async function confirmSigner(sequelize: Sequelize, actor: User, password: string | undefined, check: boolean) {
  if (actor.role !== 'director') throw forbidden('Only a director signs reports');
  const account = await findUserById(actor.id);
  if (!account || !account.active) throw badSignaturePassword();
  if (!check) return account;
  const now = new Date();
  refuseIfLocked(account.lockedUntil, now);
  if (!(await verifyPassword(password ?? '', account.passwordHash))) {
    return countWrongPassword(sequelize, { userId: account.id }, badSignaturePassword, now);
  }
  await admitRightPassword(sequelize, account.id, now);
  return account;
}

/** Everything a report of the case is built from, read before the write transaction opens. */
export async function loadReportMaterial(caseId: number) {
  const detail = await loadCaseDetail(caseId);
  if (!detail) throw notFound('Case', caseId);
  const resultsBySpecimen: Map<number, ReportableResults> = await toReportableResults(await getCaseResults(caseId));
  const specimen = chooseReportedSpecimen(detail.specimens, (id) => (resultsBySpecimen.get(id)?.results.length ?? 0) > 0);
  const results = specimen ? (resultsBySpecimen.get(specimen.id) ?? null) : null;
  return { detail, resultsBySpecimen, specimen, results };
}

export function proposalFor(material: Awaited<ReturnType<typeof loadReportMaterial>>): string {
  const { specimen, results } = material;
  if (!specimen) return 'No specimen has been received for this case.';
  return proposeInterpretation({
    specimenType: specimen.type,
    accepted: specimen.accepted,
    rejectionReason: specimen.rejectionReason,
    results: results?.results ?? [],
    findings: results?.findings ?? [],
    criteriaLabel: results?.criteria?.ruleSetLabel ?? null,
  });
}

async function renderSigned(
  material: Awaited<ReturnType<typeof loadReportMaterial>>,
  signer: { name: string; title: string | null },
  interpretation: string,
  meaning: string,
  signedAt: Date,
  version: VersionInput,
) {
  const { detail, specimen, resultsBySpecimen } = material;
  if (!specimen) throw invalidState('The case has no specimen, so there is nothing to report.');
  const [laboratory, clinician] = await Promise.all([getLabProfile(), findUserById(detail.referringClinician.id)]);
  const document = buildReportDocument({
    laboratory,
    caseDetail: detail,
    clinician: { name: clinician?.name ?? detail.referringClinician.name, title: clinician?.title ?? null },
    primarySpecimen: specimen,
    resultsBySpecimen,
    interpretation,
    signature: { signerName: signer.name, signerTitle: signer.title?.trim() || 'Laboratory director', signedAt, meaning },
    version,
  });
  // pdfkit and fontkit load on the first report (or the warm-up after start-up), not before the server listens.
  const { renderReportPdf, ReportDocumentError } = await import('../../domain/report-pdf/render-report-pdf');
  let pdf: Buffer;
  try {
    pdf = await renderReportPdf(document);
  } catch (err) {
    if (err instanceof ReportDocumentError) {
      throw invalidState(
        `The report cannot be produced until this is fixed: ${err.fieldErrors.map((e) => `${e.path}: ${e.message}`).join('; ')}`,
      );
    }
    throw err;
  }
  const documentText = JSON.stringify(document);
  return { document, documentText, documentSha256: sha256Hex(documentText), pdf, pdfSha256: sha256Hex(pdf), specimen };
}

async function signedResult(reportId: number, caseDetail: CaseDetail): Promise<SignResult> {
  const stored = (await repo.findReport(reportId))!;
  const versions = await repo.versionsOf([stored.supersedesReportId, stored.supersededByReportId].filter((x): x is number => x !== null));
  return { report: repo.toDetail(stored, versions), caseState: caseDetail.state, caseVersion: caseDetail.version };
}

/** The clinician's notice, composed before the write transaction opens; null when none is to be sent. */
async function noticeFor(
  notices: NoticeDeps | null,
  opts: SigningOptions,
  kind: 'report_ready' | 'report_corrected',
  detail: CaseDetail,
  version: number,
  supersedesVersion: number | null,
): Promise<PreparedNotice | null> {
  if (!notices || opts.notify === false) return null;
  const notice = { kind, caseId: detail.id, accession: detail.accession, version, supersedesVersion, recipient: detail.referringClinician };
  return prepareReportNotice(notices, notice);
}

/**
 * Signs a case awaiting review: checks the password again, renders the PDF once, and in one transaction moves
 * the case to final and stores the report (PDF bytes, SHA-256 of the PDF and of the signed document, signer,
 * time and meaning) with its audit event and the clinician's notice, which the notice worker delivers.
 */
export async function signCase(
  sequelize: Sequelize,
  notices: NoticeDeps | null,
  actor: User,
  caseId: number,
  input: SignCaseInput,
  opts: SigningOptions = {},
): Promise<SignResult> {
  const signer = await confirmSigner(sequelize, actor, input.password, opts.checkPassword ?? true);
  const material = await loadReportMaterial(caseId);
  const { detail } = material;
  if (detail.state === 'final' || detail.state === 'corrected') {
    throw invalidState('This case is already signed. To change its report, issue a corrected report.');
  }
  if (detail.state !== 'awaiting_review') {
    throw invalidState('Only a case awaiting review can be signed.');
  }
  if (detail.amendReason !== null) {
    throw invalidState('This case already has a signed report and was reopened to correct it: sign it as a corrected report.');
  }
  if (input.version !== undefined && input.version !== detail.version) throw staleVersion('case');

  const interpretation =
    input.interpretation ??
    (await repo.findDraft(caseId).then((d) => (d && d.interpretation.trim().length >= 10 ? d.interpretation : null))) ??
    proposalFor(material);
  const meaning = input.meaning ?? DEFAULT_SIGNATURE_MEANING;
  const signedAt = opts.now ?? new Date();
  const r = await renderSigned(material, signer, interpretation, meaning, signedAt, { version: 1, status: 'final' });
  const notice = await noticeFor(notices, opts, 'report_ready', detail, 1, null);

  const { reportId, after } = await writeTransaction(sequelize, async (t) => {
    // transitionCase re-reads the case inside the transaction: a second signature, or a return to the
    // technologist since the page was read, fails here and nothing is stored.
    const after = await transitionCase(sequelize, actor, caseId, 'final', { version: detail.version }, t);
    const reportId = await repo.insertReport(
      {
        caseId,
        version: 1,
        kind: 'final',
        specimenId: r.specimen.id,
        patternSummary: reportPatternSummary(r.document),
        interpretation: r.document.interpretation,
        meaning,
        signedById: signer.id,
        signerName: r.document.signature.signerName,
        signerTitle: r.document.signature.signerTitle,
        signedAt,
        supersedesReportId: null,
        correctionReason: null,
        changesSummary: null,
        document: r.documentText,
        documentSha256: r.documentSha256,
        pdf: r.pdf,
        pdfSha256: r.pdfSha256,
      },
      t,
    );
    await recordAudit(
      actor,
      {
        action: 'sign',
        entity: 'report',
        entityId: reportId,
        caseId,
        after: { version: 1, status: 'final', signedAt: signedAt.toISOString(), meaning, documentSha256: r.documentSha256, pdfSha256: r.pdfSha256 },
        note: meaning,
      },
      t,
    );
    await recordSignedCohort(sequelize, { reportId, version: 1, status: 'final', document: r.document }, detail, material.resultsBySpecimen, t);
    if (notice) await queueReportNotice(notice, reportId, t);
    return { reportId, after };
  });

  if (notice) nudgeNoticeWorkers();
  return signedResult(reportId, after);
}

/**
 * Issues a corrected report: a new signed version with the reason and a summary of what changed. The version
 * it supersedes is kept byte for byte and marked superseded; the case moves to corrected; the clinician is told.
 * A signed case corrects its wording only. A case reopened with amendCase and submitted again carries the
 * results frozen at that submission, with every printed value that differs from the superseded version.
 */
export async function correctReport(
  sequelize: Sequelize,
  notices: NoticeDeps | null,
  actor: User,
  caseId: number,
  input: CorrectReportInput,
  opts: SigningOptions = {},
): Promise<SignResult> {
  const signer = await confirmSigner(sequelize, actor, input.password, opts.checkPassword ?? true);
  const material = await loadReportMaterial(caseId);
  const { detail } = material;
  const amended = detail.amendReason !== null;
  if (amended && detail.state !== 'awaiting_review') {
    throw invalidState('The reopened case must be submitted for review again before its correction is signed.');
  }
  if (!amended && detail.state !== 'final' && detail.state !== 'corrected') {
    throw invalidState('Only a signed case (final or corrected) can get a corrected report.');
  }
  if (input.version !== undefined && input.version !== detail.version) throw staleVersion('case');
  const current = await repo.findCurrentReportOfCase(caseId);
  if (!current) throw invalidState('This case has no signed report to correct.');

  const version = current.version + 1;
  const interpretation = input.interpretation ?? current.interpretation;
  const meaning = input.meaning ?? DEFAULT_CORRECTION_MEANING;
  const signedAt = opts.now ?? new Date();
  const r = await renderSigned(material, signer, interpretation, meaning, signedAt, {
    version,
    status: 'corrected',
    supersedesVersion: current.version,
    correctionReason: input.reason,
    changesSummary: input.changesSummary,
    previous: current.document,
  });
  const notice = await noticeFor(notices, opts, 'report_corrected', detail, version, current.version);

  const { reportId, after } = await writeTransaction(sequelize, async (t) => {
    const after = await transitionCase(sequelize, actor, caseId, 'corrected', { version: detail.version }, t);
    const reportId = await repo.insertReport(
      {
        caseId,
        version,
        kind: 'corrected',
        specimenId: r.specimen.id,
        patternSummary: reportPatternSummary(r.document),
        interpretation: r.document.interpretation,
        meaning,
        signedById: signer.id,
        signerName: r.document.signature.signerName,
        signerTitle: r.document.signature.signerTitle,
        signedAt,
        supersedesReportId: current.id,
        correctionReason: input.reason,
        changesSummary: input.changesSummary,
        document: r.documentText,
        documentSha256: r.documentSha256,
        pdf: r.pdf,
        pdfSha256: r.pdfSha256,
      },
      t,
    );
    if (!(await repo.markSuperseded(current.id, reportId, signedAt, t))) {
      throw conflict('Another corrected report was issued for this case at the same time. Reload and check it.');
    }
    await recordAudit(
      actor,
      {
        action: 'correct',
        entity: 'report',
        entityId: reportId,
        caseId,
        before: { reportId: current.id, version: current.version, status: current.kind },
        after: {
          version,
          status: 'corrected',
          supersedes: current.version,
          signedAt: signedAt.toISOString(),
          meaning,
          reason: input.reason,
          changesSummary: input.changesSummary,
          ...(amended ? { reopenedFor: detail.amendReason, changedValues: r.document.report.changedValues ?? [] } : {}),
          documentSha256: r.documentSha256,
          pdfSha256: r.pdfSha256,
        },
        note: input.reason,
      },
      t,
    );
    await recordSignedCohort(sequelize, { reportId, version, status: 'corrected', document: r.document }, detail, material.resultsBySpecimen, t);
    if (notice) await queueReportNotice(notice, reportId, t);
    return { reportId, after };
  });

  if (notice) nudgeNoticeWorkers();
  return signedResult(reportId, after);
}
