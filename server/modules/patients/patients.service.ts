import type { Sequelize, Transaction } from 'sequelize';
import {
  EXISTING_PATIENT_FIELD,
  type CreatePatientInput,
  type Patient,
  type UpdatePatientInput,
} from '@/schemas/case';
import type { User } from '@/schemas/user';
import { AppError, badInput, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { refreshPatientOnCases } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { displayName, nameKeyOf, searchTokens } from './patient-names';
import * as repo from './patients.repository';

/** Lab IDs are compared and stored in capitals, so "demo-0001" and "DEMO-0001" are one patient. */
const normaliseLabId = (s: string) => s.trim().toUpperCase();

/** A 409 naming the registered patient: `sentence` says what clashed, given who the patient is. */
function duplicateOf(existing: Patient, fields: string[], sentence: (who: string) => string): AppError {
  // The lab ID is named once: a clash on it already says which ID.
  const labId = fields.includes('labPatientId') ? '' : `, lab ID ${existing.labPatientId}`;
  const said = sentence(`${displayName(existing)}, born ${existing.dateOfBirth}${labId}`);
  return new AppError('CONFLICT', `${said}. Use that patient instead of registering a new one.`, {
    fields: {
      ...Object.fromEntries(fields.map((f) => [f, said])),
      [EXISTING_PATIENT_FIELD]: String(existing.id),
    },
  });
}

/** Someone confirmed as a different person from a registered patient with the same name and birth date. */
type DistinctPerson = { confirmDistinctFrom?: number; distinctReason?: string };

/**
 * Catches a second registration of the same person: same lab ID (always refused), or same name and date of
 * birth (refused unless the user confirms, with a reason, that this is a different person from one of them).
 * Returns the audit note of such a confirmation, or null.
 */
async function assertNotDuplicate(
  candidate: { labPatientId: string; nameKey: string; dateOfBirth: string },
  exceptId: number | null,
  distinct: DistinctPerson,
  transaction: Transaction,
): Promise<string | null> {
  const { byLabId: byId, sameNameAndBirth } = await repo.findPossibleDuplicates(candidate, transaction);
  if (byId && byId.id !== exceptId) {
    throw duplicateOf(byId, ['labPatientId'], (who) => `Lab patient ID ${byId.labPatientId} already belongs to ${who}`);
  }
  const sameName = sameNameAndBirth.filter((p) => p.id !== exceptId);
  const { confirmDistinctFrom: otherId, distinctReason: reason } = distinct;
  if (otherId === undefined || !reason) {
    if (sameName[0]) {
      throw duplicateOf(sameName[0], ['familyName', 'givenName', 'dateOfBirth'], (who) => `A patient with this name and date of birth is already registered: ${who}`);
    }
    return null;
  }
  const other = sameName.find((p) => p.id === otherId);
  if (!other) {
    throw badInput({
      confirmDistinctFrom: `Patient ${otherId} does not share this name and date of birth; leave the confirmation out`,
    });
  }
  const others = sameName.map((p) => `${p.labPatientId} (id ${p.id})`).join(', ');
  return `Confirmed a different person from ${others}, same name and date of birth: ${reason}`;
}

export async function getPatient(id: number): Promise<Patient> {
  const p = await repo.findPatientById(id);
  if (!p) throw notFound('Patient', id);
  return p;
}

/** Up to `limit` patients matching what has been typed so far (name in any order, lab ID, or date of birth). */
export async function findPatients(q: string | undefined, limit = 10): Promise<Patient[]> {
  const tokens = searchTokens(q);
  if (tokens.length === 0) return [];
  return repo.searchPatients(tokens, limit);
}

export async function registerPatient(sequelize: Sequelize, actor: User, input: CreatePatientInput): Promise<Patient> {
  return writeTransaction(sequelize, async (transaction) => {
    const data = {
      labPatientId: normaliseLabId(input.labPatientId),
      familyName: input.familyName,
      givenName: input.givenName,
      dateOfBirth: input.dateOfBirth,
      sex: input.sex,
      nameKey: nameKeyOf(input.familyName, input.givenName),
    };
    const note = await assertNotDuplicate(data, null, input, transaction);
    const created = await repo.insertPatient(data, transaction);
    await recordAudit(actor, { action: 'create', entity: 'patient', entityId: created.id, after: created, note }, transaction);
    return created;
  });
}

/** Corrects a patient's details; the names and lab ID copied onto their cases for search follow. */
export async function correctPatient(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: UpdatePatientInput,
): Promise<Patient> {
  return writeTransaction(sequelize, async (transaction) => {
    const current = await repo.findPatientById(id, transaction);
    if (!current) throw notFound('Patient', id);
    const { version, confirmDistinctFrom, distinctReason, ...changes } = input;
    const next = {
      labPatientId: changes.labPatientId !== undefined ? normaliseLabId(changes.labPatientId) : current.labPatientId,
      familyName: changes.familyName ?? current.familyName,
      givenName: changes.givenName ?? current.givenName,
      dateOfBirth: changes.dateOfBirth ?? current.dateOfBirth,
      sex: changes.sex ?? current.sex,
    };
    const nameKey = nameKeyOf(next.familyName, next.givenName);
    if (version !== current.version) throw staleVersion('patient');
    const note = await assertNotDuplicate({ ...next, nameKey }, id, { confirmDistinctFrom, distinctReason }, transaction);
    if (!(await repo.updatePatientIfVersion(id, version, { ...next, nameKey }, transaction))) throw staleVersion('patient');
    const after = (await repo.findPatientById(id, transaction))!;
    await refreshPatientOnCases(after, transaction);
    await recordAudit(actor, { action: 'update', entity: 'patient', entityId: id, before: current, after, note }, transaction);
    return after;
  });
}
