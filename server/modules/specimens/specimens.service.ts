import type { Sequelize, Transaction } from 'sequelize';
import type {
  CreateRejectionReasonInput,
  ReceiveSpecimenInput,
  RejectionReason,
  Specimen,
  UpdateSpecimenInput,
} from '@/schemas/case';
import { caseStateLabels, type CaseState } from '@/schemas/case';
import type { User } from '@/schemas/user';
import { AppError, badInput, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { findCaseById, setSpecimenColumns } from '../cases/cases.repository';
import { parseLabDateTime } from '../cases/lab-time';
import { labTimeZone } from '../cases/lab-zone';
import { writeTransaction } from '../../db/write-transaction';
import { listMeasurementsOfSpecimen } from '../measurements/measurements.repository';
import * as repo from './specimens.repository';

/** Specimens can be received or corrected until the case goes for review. */
export const specimenEditableStates: readonly CaseState[] = ['received', 'in_assay'];

/** Allow for clocks a few minutes apart between the bench PC and the server. */
const FUTURE_TOLERANCE_MS = 5 * 60_000;

/** A, B, … Z, AA, AB, …: the label of the n-th specimen (0-based) of a case. */
export function specimenLabel(n: number): string {
  let s = '';
  let i = n + 1;
  while (i > 0) {
    const r = (i - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    i = Math.floor((i - 1) / 26);
  }
  return s;
}

/** Reads a form date-time in the lab's zone; a bad or future value is a 400 naming the field. */
export function readDateTime(field: string, value: string, timeZone: string, now: Date): Date {
  const d = parseLabDateTime(value, timeZone);
  if (!d) throw badInput({ [field]: 'Use a date and time such as 2026-03-04T09:30' });
  if (d.getTime() > now.getTime() + FUTURE_TOLERANCE_MS) throw badInput({ [field]: 'This date and time is in the future' });
  return d;
}

/** Checks a received specimen's input and turns it into the stored row (dates in UTC). */
export function specimenRowFromInput(
  caseId: number,
  label: string,
  input: ReceiveSpecimenInput,
  timeZone: string,
  now: Date,
  fieldPrefix = '',
): repo.SpecimenRow {
  const receivedAt = readDateTime(`${fieldPrefix}receivedAt`, input.receivedAt, timeZone, now);
  const collectedAt = input.collectedAt ? readDateTime(`${fieldPrefix}collectedAt`, input.collectedAt, timeZone, now) : null;
  if (collectedAt && collectedAt > receivedAt) throw badInput({ [`${fieldPrefix}collectedAt`]: 'Collection cannot be after receipt' });
  return {
    caseId,
    label,
    type: input.type,
    source: input.source,
    collectedAt,
    receivedAt,
    transportCondition: input.transportCondition,
    wetWeightMg: input.wetWeightMg,
    accepted: input.accepted,
    rejectionReason: input.accepted ? null : (input.rejectionReason ?? null),
  };
}

function assertEditable(state: CaseState, accession: string): void {
  if (!specimenEditableStates.includes(state)) {
    throw invalidState(
      `Case ${accession} is ${caseStateLabels[state].toLowerCase()}; specimens can be received or changed only while it is received or in assay.`,
    );
  }
}

/** Stores one specimen of a case and brings the case's list columns up to date. Runs in the caller's transaction. */
export async function storeSpecimen(
  actor: User,
  row: repo.SpecimenRow,
  transaction: Transaction,
): Promise<Specimen> {
  const created = await repo.insertSpecimen(row, transaction);
  const summary = await repo.specimenSummaryOfCase(row.caseId, transaction);
  await setSpecimenColumns(row.caseId, summary.types, summary.earliestReceipt, transaction);
  await recordAudit(
    actor,
    { action: 'create', entity: 'specimen', entityId: created.id, caseId: row.caseId, after: created },
    transaction,
  );
  return created;
}

export async function receiveSpecimen(
  sequelize: Sequelize,
  actor: User,
  caseId: number,
  input: ReceiveSpecimenInput,
): Promise<Specimen> {
  const timeZone = await labTimeZone();
  return writeTransaction(sequelize, async (t) => {
    const c = await findCaseById(caseId, t);
    if (!c) throw notFound('Case', caseId);
    assertEditable(c.state, c.accession);
    const existing = await repo.listSpecimensOfCase(caseId, t);
    const row = specimenRowFromInput(caseId, specimenLabel(existing.length), input, timeZone, new Date());
    return storeSpecimen(actor, row, t);
  });
}

export async function changeSpecimen(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: UpdateSpecimenInput,
): Promise<Specimen> {
  const timeZone = await labTimeZone();
  return writeTransaction(sequelize, async (t) => {
    const current = await repo.findSpecimenById(id, t);
    if (!current) throw notFound('Specimen', id);
    const c = (await findCaseById(current.caseId, t))!;
    assertEditable(c.state, c.accession);
    if (input.version !== current.version) throw staleVersion('specimen');

    const now = new Date();
    const { version, ...fields } = input;
    const changes: Parameters<typeof repo.updateSpecimenIfVersion>[2] = {};
    if (fields.source !== undefined) changes.source = fields.source;
    if (fields.transportCondition !== undefined) changes.transportCondition = fields.transportCondition;
    if (fields.wetWeightMg !== undefined) changes.wetWeightMg = fields.wetWeightMg;
    if (fields.receivedAt !== undefined) changes.receivedAt = readDateTime('receivedAt', fields.receivedAt, timeZone, now);
    if (fields.collectedAt !== undefined) {
      changes.collectedAt = fields.collectedAt === null ? null : readDateTime('collectedAt', fields.collectedAt, timeZone, now);
    }
    const receivedAt = changes.receivedAt ?? new Date(current.receivedAt);
    const collectedAt = changes.collectedAt !== undefined ? changes.collectedAt : current.collectedAt ? new Date(current.collectedAt) : null;
    if (collectedAt && collectedAt > receivedAt) throw badInput({ collectedAt: 'Collection cannot be after receipt' });

    const accepted = fields.accepted ?? current.accepted;
    const reason = accepted ? null : (fields.rejectionReason ?? current.rejectionReason);
    if (!accepted && !reason) throw badInput({ rejectionReason: 'Give the reason the specimen is rejected' });
    if (accepted && fields.rejectionReason) {
      throw badInput({ rejectionReason: 'Only a rejected specimen has a rejection reason' });
    }
    // Rejection is a decision on receipt: a specimen that already has assay results cannot be rejected
    // afterwards without deleting them first, so no result is ever silently dropped from the report.
    if (current.accepted && !accepted && (await listMeasurementsOfSpecimen(id, t)).length > 0) {
      throw new AppError('INVALID_STATE', `Specimen ${current.label} already has assay results; delete them on the assay bench before rejecting it.`, {
        fields: { accepted: 'This specimen already has assay results' },
      });
    }
    changes.accepted = accepted;
    changes.rejectionReason = reason;

    if (!(await repo.updateSpecimenIfVersion(id, version, changes, t))) throw staleVersion('specimen');
    const after = (await repo.findSpecimenById(id, t))!;
    if (changes.receivedAt) {
      const summary = await repo.specimenSummaryOfCase(current.caseId, t);
      await setSpecimenColumns(current.caseId, summary.types, summary.earliestReceipt, t);
    }
    const action = current.accepted && !after.accepted ? 'reject' : 'update';
    await recordAudit(actor, { action, entity: 'specimen', entityId: id, caseId: current.caseId, before: current, after }, t);
    return after;
  });
}

/* ---------------------------------------------------------------- rejection reasons */

export async function listRejectionReasons(): Promise<RejectionReason[]> {
  return repo.listActiveReasons();
}

export async function addRejectionReason(
  sequelize: Sequelize,
  actor: User | null,
  input: CreateRejectionReasonInput,
): Promise<RejectionReason> {
  return writeTransaction(sequelize, async (t) => {
    if (await repo.findReasonByText(input.text, t)) {
      throw new AppError('CONFLICT', 'This reason is already on the list', { fields: { text: 'This reason is already on the list' } });
    }
    const created = await repo.insertReason(input.text, t);
    await recordAudit(actor, { action: 'create', entity: 'rejection-reason', entityId: created.id, after: created }, t);
    return created;
  });
}
