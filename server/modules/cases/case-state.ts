import type { Sequelize, Transaction } from 'sequelize';
import { caseStateLabels, type CaseDetail, type CaseState } from '@/schemas/case';
import type { User } from '@/schemas/user';
import { badInput, forbidden, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { findCaseById, loadCaseDetail, updateCaseIfVersion } from './cases.repository';
import { withWriteTransaction } from '../../db/write-transaction';

type Rule = { reason: boolean; directorOnly: boolean };

/** Every allowed move of the workflow; anything not listed is refused with INVALID_STATE. */
export const allowedTransitions: Readonly<Record<CaseState, Partial<Record<CaseState, Rule>>>> = {
  received: {
    in_assay: { reason: false, directorOnly: false },
    cancelled: { reason: true, directorOnly: false },
  },
  in_assay: {
    awaiting_review: { reason: false, directorOnly: false },
    cancelled: { reason: true, directorOnly: false },
  },
  awaiting_review: {
    // The director sends the case back for more work and says why.
    in_assay: { reason: true, directorOnly: true },
    final: { reason: false, directorOnly: true },
    // Only a case reopened after signing: the director signs the correction of its results.
    corrected: { reason: false, directorOnly: true },
    cancelled: { reason: true, directorOnly: false },
  },
  // A director reopens a signed case to correct its results, and says why (CLIA 42 CFR 493.1291(k)).
  final: { corrected: { reason: false, directorOnly: true }, in_assay: { reason: true, directorOnly: true } },
  corrected: { corrected: { reason: false, directorOnly: true }, in_assay: { reason: true, directorOnly: true } },
  cancelled: {},
};

export function canTransition(from: CaseState, to: CaseState): boolean {
  return allowedTransitions[from][to] !== undefined;
}

/**
 * A case reopened after signing already has a signed report: it cannot get a first signature or be cancelled,
 * only a corrected version; and only such a case goes from awaiting review straight to corrected.
 */
function refuseAmendmentMismatch(underAmendment: boolean, from: CaseState, to: CaseState): void {
  if (underAmendment && to === 'final') {
    throw invalidState('This case already has a signed report and is being amended: sign the correction instead.');
  }
  if (underAmendment && to === 'cancelled') {
    throw invalidState('This case already has a signed report, so it cannot be cancelled. Finish the amendment and sign the correction.');
  }
  if (!underAmendment && from === 'awaiting_review' && to === 'corrected') {
    throw invalidState('Only a signed case that was reopened for amendment can be signed as a correction from review.');
  }
}

export type TransitionOptions = { reason?: string | null; version: number };

/**
 * Moves a case to another workflow state, checking the move is allowed, the reason is given where one is
 * required, and the version is the one the caller saw; writes the audit event with the before and after
 * state. Runs in `transaction` when given (e.g. a submission that also freezes results), otherwise in its own.
 */
export async function transitionCase(
  sequelize: Sequelize,
  actor: User,
  caseId: number,
  to: CaseState,
  opts: TransitionOptions,
  transaction?: Transaction,
): Promise<CaseDetail> {
  return withWriteTransaction(sequelize, transaction, async (t) => {
    const current = await findCaseById(caseId, t);
    if (!current) throw notFound('Case', caseId);
    const rule = allowedTransitions[current.state][to];
    if (!rule) {
      throw invalidState(
        `A case that is ${caseStateLabels[current.state].toLowerCase()} cannot be moved to ${caseStateLabels[to].toLowerCase()}.`,
      );
    }
    if (rule.directorOnly && actor.role !== 'director') {
      throw forbidden(`Only a director can move a case to ${caseStateLabels[to].toLowerCase()}.`);
    }
    const reason = opts.reason?.trim() || null;
    if (rule.reason && (!reason || reason.length < 3)) throw badInput({ reason: 'Give a reason' });
    if (opts.version !== current.version) throw staleVersion('case');
    refuseAmendmentMismatch(current.amendReason !== null, current.state, to);

    const changes: Parameters<typeof updateCaseIfVersion>[2] = { state: to };
    if (to === 'cancelled') changes.cancelReason = reason;
    if (current.state === 'awaiting_review' && to === 'in_assay') changes.returnReason = reason;
    if ((current.state === 'final' || current.state === 'corrected') && to === 'in_assay') {
      // Reopened after signing: the technologists see the reason as they would a return for more work.
      Object.assign(changes, { returnReason: reason, amendReason: reason, amendedAt: new Date() });
    }
    if (to === 'corrected') Object.assign(changes, { amendReason: null, amendedAt: null });
    if (!(await updateCaseIfVersion(caseId, opts.version, changes, t))) throw staleVersion('case');

    await recordAudit(
      actor,
      {
        action: 'state-change',
        entity: 'case',
        entityId: caseId,
        caseId,
        before: { state: current.state, version: current.version },
        after: { state: to, version: current.version + 1, ...(reason ? { reason } : {}) },
        note: reason,
      },
      t,
    );
    return (await loadCaseDetail(caseId, t))!;
  });
}
