import type { Sequelize } from 'sequelize';
import type { CaseDetail } from '@/schemas/case';
import type { AmendCaseInput } from '@/schemas/report';
import type { User } from '@/schemas/user';
import { invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { transitionCase } from '../cases/case-state';
import { findCaseById } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { confirmSigner } from './report-signing.service';
import * as repo from './reports.repository';

/**
 * A director reopens a signed case so that what was wrong in its results can be put right (CLIA 42 CFR
 * 493.1291(k) [confirmed]: an error in a released report is corrected and the corrected report sent, with the
 * original kept). The password is typed again as for a signature and counts toward the same lock-out. In one
 * transaction the case goes back to in assay with the reason, and the audit trail records both the state change
 * and which signed version is being amended. The signed reports are not touched: they stay readable, and
 * screens say a corrected version will follow until the correction is signed.
 */
export async function amendCase(sequelize: Sequelize, actor: User, caseId: number, input: AmendCaseInput): Promise<CaseDetail> {
  await confirmSigner(sequelize, actor, input.password, true);
  return writeTransaction(sequelize, async (t) => {
    const c = await findCaseById(caseId, t);
    if (!c) throw notFound('Case', caseId);
    if (c.state !== 'final' && c.state !== 'corrected') {
      throw invalidState('Only a signed case (final or corrected) can be reopened for amendment.');
    }
    if (input.version !== undefined && input.version !== c.version) throw staleVersion('case');
    const current = await repo.findCurrentReportOfCase(caseId, t);
    if (!current) throw invalidState('This case has no signed report to amend.');
    const reason = input.reason.trim();
    const after = await transitionCase(sequelize, actor, caseId, 'in_assay', { reason, version: c.version }, t);
    await recordAudit(
      actor,
      {
        action: 'amend',
        entity: 'report',
        entityId: current.id,
        caseId,
        before: { caseState: c.state, reportVersion: current.version, pdfSha256: current.pdfSha256 },
        after: { caseState: after.state, reason },
        note: reason,
      },
      t,
    );
    return after;
  });
}
