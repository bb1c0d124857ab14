import type { Transaction } from 'sequelize';
import { CaseModel } from '../cases/case.model';

/** The frozen results text of a case, or null. */
export async function readResultsSnapshot(caseId: number, transaction?: Transaction): Promise<string | null> {
  const row = await CaseModel.findByPk(caseId, { attributes: ['id', 'resultsSnapshot'], transaction });
  return row?.resultsSnapshot ?? null;
}

/**
 * Stores the frozen results and the pattern code. The case's version is left alone: the state change that
 * goes with a submission, in the same transaction, checks and advances it.
 */
export async function writeResultsSnapshot(
  caseId: number,
  snapshot: string,
  patternCode: string | null,
  transaction: Transaction,
): Promise<void> {
  await CaseModel.update({ resultsSnapshot: snapshot, patternCode }, { where: { id: caseId }, transaction });
}
