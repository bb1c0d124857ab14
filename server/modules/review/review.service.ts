import type { Sequelize } from 'sequelize';
import type { CaseDetail, ReasonInput } from '@/schemas/case';
import type { InterpretationDraft, ReviewCase, ReviewQueueItem, SaveDraftInput } from '@/schemas/report';
import type { User } from '@/schemas/user';
import { invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { transitionCase } from '../cases/case-state';
import { findCaseById } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { loadReportMaterial, proposalFor } from '../reports/report-signing.service';
import * as reportsRepo from '../reports/reports.repository';
import { listReportsOfCase } from '../reports/reports.service';
import { getCaseResults } from '../results/results.service';
import { lastSubmissions, listCasesAwaitingReview } from './review.repository';

const PRIORITY_RANK = { urgent: 0, routine: 1 } as const;

/**
 * The director's queue: every case awaiting review, urgent before routine, then the one waiting longest
 * (since submission, else since receipt) first, each with the pattern read from its frozen results.
 */
export async function reviewQueue(): Promise<ReviewQueueItem[]> {
  const rows = await listCasesAwaitingReview();
  const submissions = await lastSubmissions(rows.map((r) => r.caseId));
  const items: ReviewQueueItem[] = [];
  for (const r of rows) {
    const results = await getCaseResults(r.caseId).catch(() => null);
    const headlines = (results?.specimens ?? [])
      .filter((s) => s.pattern)
      .map((s) => (results!.specimens.length > 1 ? `${s.label}: ${s.pattern!.headline}` : s.pattern!.headline));
    const submitted = submissions.get(r.caseId) ?? null;
    items.push({
      caseId: r.caseId,
      accession: r.accession,
      patientName: r.patientName,
      priority: r.priority,
      specimenTypes: r.specimenTypes,
      receivedAt: r.receivedAt ? r.receivedAt.toISOString() : null,
      submittedAt: submitted ? submitted.at.toISOString() : null,
      submittedByName: submitted?.byName ?? null,
      referringClinicianName: r.referringClinicianName,
      patternCode: results?.patternCode ?? r.patternCode,
      patternSummary: headlines.length ? headlines.join(' · ') : null,
      version: r.version,
    });
  }
  const waitingSince = (i: ReviewQueueItem) => Date.parse(i.submittedAt ?? i.receivedAt ?? '') || Number.MAX_SAFE_INTEGER;
  return items.sort(
    (a, b) => PRIORITY_RANK[a.priority] - PRIORITY_RANK[b.priority] || waitingSince(a) - waitingSince(b) || a.caseId - b.caseId,
  );
}

/** Everything the review page shows beside the results table: the proposal, the draft and the report versions. */
export async function reviewCase(caseId: number): Promise<ReviewCase> {
  const material = await loadReportMaterial(caseId);
  const { detail, specimen, resultsBySpecimen } = material;
  const [draft, reports, submissions] = await Promise.all([
    reportsRepo.findDraft(caseId),
    listReportsOfCase(caseId),
    lastSubmissions([caseId]),
  ]);
  const notes: string[] = [];
  // Every specimen is printed in its own section; the notes about results come from each specimen that has any.
  if (specimen && !specimen.accepted) notes.push(`Specimen ${specimen.label} was rejected on receipt; the report will say so and carry no results.`);
  for (const s of detail.specimens) {
    const r = s.accepted ? resultsBySpecimen.get(s.id) : undefined;
    for (const note of r?.notes ?? []) if (!notes.includes(note)) notes.push(note);
  }
  if (detail.returnReason && detail.state === 'awaiting_review') notes.push(`Returned earlier with this reason: ${detail.returnReason}`);
  const submitted = submissions.get(caseId) ?? null;
  return {
    case: detail,
    state: detail.state,
    reportedSpecimenId: specimen?.id ?? null,
    proposal: { patternSummary: material.results?.patternSummary ?? null, interpretation: proposalFor(material) },
    draft,
    reports,
    notes,
    submittedAt: submitted ? submitted.at.toISOString() : null,
    submittedByName: submitted?.byName ?? null,
  };
}

/** Saves the director's working text; a save based on an older draft is refused (409) rather than lost. */
export async function saveDraft(sequelize: Sequelize, actor: User, caseId: number, input: SaveDraftInput): Promise<InterpretationDraft> {
  return writeTransaction(sequelize, async (t) => {
    const c = await findCaseById(caseId, t);
    if (!c) throw notFound('Case', caseId);
    if (c.state !== 'awaiting_review') throw invalidState('The interpretation can be drafted only while the case awaits review.');
    const before = await reportsRepo.findDraft(caseId, t);
    if (!(await reportsRepo.saveDraftIfVersion(caseId, input.version, input.interpretation, actor.id, t))) {
      throw staleVersion('interpretation draft');
    }
    const after = (await reportsRepo.findDraft(caseId, t))!;
    await recordAudit(
      actor,
      {
        action: before ? 'update' : 'create',
        entity: 'interpretation-draft',
        entityId: caseId,
        caseId,
        before: before ? { interpretation: before.interpretation, version: before.version } : undefined,
        after: { interpretation: after.interpretation, version: after.version },
      },
      t,
    );
    return after;
  });
}

/** The director sends the case back to the technologists with a reason (awaiting review → in assay). */
export async function returnForWork(sequelize: Sequelize, actor: User, caseId: number, input: ReasonInput): Promise<CaseDetail> {
  return transitionCase(sequelize, actor, caseId, 'in_assay', { reason: input.reason, version: input.version });
}
