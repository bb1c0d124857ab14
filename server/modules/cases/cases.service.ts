import type { Sequelize, Transaction } from 'sequelize';
import {
  type CaseDetail,
  type CaseList,
  type CaseListQuery,
  type CaseState,
  type ReasonInput,
  type RegisterCaseInput,
  type UpdateCaseInput,
} from '@/schemas/case';
import { caseStateLabels } from '@/schemas/case';
import type { User } from '@/schemas/user';
import { badInput, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { displayName, searchTokens } from '../patients/patient-names';
import { findPatientById } from '../patients/patients.repository';
import { specimenRowFromInput, storeSpecimen } from '../specimens/specimens.service';
import { transitionCase } from './case-state';
import * as repo from './cases.repository';
import { endOfLabDay, labYear, startOfLabDay } from './lab-time';
import { labTimeZone } from './lab-zone';
import { writeTransaction } from '../../db/write-transaction';

export const DEFAULT_PAGE_SIZE = 25;

/** The case facts (clinician, indication, priority) can be corrected until the case is signed or cancelled. */
export const caseEditableStates: readonly CaseState[] = ['received', 'in_assay', 'awaiting_review'];

/** CR-2026-00042: the lab year, then the year's sequence number, five digits wide (wider past 99 999). */
export function formatAccession(year: number, n: number): string {
  return `CR-${year}-${String(n).padStart(5, '0')}`;
}

/** The case as its audit events record it: the facts a person reads, with the clinician by name. */
function caseSnapshot(c: repo.CaseRecord, clinicianName: string) {
  return {
    accession: c.accession,
    patientName: c.patientName,
    referringClinician: clinicianName,
    clinicalIndication: c.clinicalIndication,
    priority: c.priority,
    state: c.state,
    version: c.version,
  };
}

async function activeClinician(id: number, transaction: Transaction) {
  const u = await repo.findUserName(id, transaction);
  if (!u || u.role !== 'clinician' || !u.active) {
    throw badInput({ referringClinicianId: 'Choose an active referring clinician from the list' });
  }
  return u;
}

export async function getCase(id: number): Promise<CaseDetail> {
  const c = await repo.loadCaseDetail(id);
  if (!c) throw notFound('Case', id);
  return c;
}

/**
 * Registers a case and receives its first specimen in one transaction: the accession number is taken from
 * the year's counter in that same transaction, so a failed registration leaves no gap and no half-case.
 */
export async function registerCase(
  sequelize: Sequelize,
  actor: User,
  input: RegisterCaseInput,
  opts: { now?: Date } = {},
): Promise<CaseDetail> {
  const timeZone = await labTimeZone();
  const id = await writeTransaction(sequelize, async (t) => {
    const now = opts.now ?? new Date();
    const patient = await findPatientById(input.patientId, t);
    if (!patient) throw badInput({ patientId: 'This patient is not registered; choose or register the patient' });
    const clinician = await activeClinician(input.referringClinicianId, t);
    // Checked before the number is taken, so bad specimen input does not use one up.
    const specimenRow = specimenRowFromInput(0, 'A', input.specimen, timeZone, now, 'specimen.');

    const year = labYear(now, timeZone);
    const accession = formatAccession(year, await repo.allocateAccessionNumber(year, t));
    const created = await repo.insertCase(
      {
        accession,
        patientId: patient.id,
        referringClinicianId: clinician.id,
        clinicalIndication: input.clinicalIndication,
        priority: input.priority,
        state: 'received',
        receivedAt: specimenRow.receivedAt,
        specimenTypes: [specimenRow.type],
        patientName: displayName(patient),
        searchText: repo.caseSearchText(accession, patient),
        createdById: actor.id,
      },
      t,
    );
    await recordAudit(
      actor,
      { action: 'create', entity: 'case', entityId: created.id, caseId: created.id, after: caseSnapshot(created, clinician.name) },
      t,
    );
    await storeSpecimen(actor, { ...specimenRow, caseId: created.id }, t);
    return created.id;
  });
  // Read back once committed, outside the one-at-a-time write section (four queries it need not wait for).
  return (await repo.loadCaseDetail(id))!;
}

export async function updateCase(sequelize: Sequelize, actor: User, id: number, input: UpdateCaseInput): Promise<CaseDetail> {
  return writeTransaction(sequelize, async (t) => {
    const current = await repo.findCaseById(id, t);
    if (!current) throw notFound('Case', id);
    if (!caseEditableStates.includes(current.state)) {
      throw invalidState(`Case ${current.accession} is ${caseStateLabels[current.state].toLowerCase()}; its details can no longer be changed.`);
    }
    if (input.version !== current.version) throw staleVersion('case');
    const { version, ...changes } = input;
    const beforeClinician = (await repo.findUserName(current.referringClinicianId, t))?.name ?? '';
    const afterClinician =
      changes.referringClinicianId !== undefined && changes.referringClinicianId !== current.referringClinicianId
        ? (await activeClinician(changes.referringClinicianId, t)).name
        : beforeClinician;
    if (!(await repo.updateCaseIfVersion(id, version, changes, t))) throw staleVersion('case');
    const after = (await repo.findCaseById(id, t))!;
    await recordAudit(
      actor,
      {
        action: 'update',
        entity: 'case',
        entityId: id,
        caseId: id,
        before: caseSnapshot(current, beforeClinician),
        after: caseSnapshot(after, afterClinician),
      },
      t,
    );
    return (await repo.loadCaseDetail(id, t))!;
  });
}

/** Cancels a case that is not yet final; the reason is kept on the case and in the audit trail. */
export async function cancelCase(sequelize: Sequelize, actor: User, id: number, input: ReasonInput): Promise<CaseDetail> {
  return transitionCase(sequelize, actor, id, 'cancelled', { reason: input.reason, version: input.version });
}

export async function listCases(query: CaseListQuery): Promise<CaseList> {
  const pageSize = query.pageSize ?? DEFAULT_PAGE_SIZE;
  const page = query.page ?? 1;
  if (query.from && query.to && query.from > query.to) throw badInput({ to: 'The end date is before the start date' });
  const timeZone = query.from || query.to ? await labTimeZone() : 'UTC';
  return repo.listCaseSummaries({
    tokens: searchTokens(query.q),
    state: query.state,
    specimenType: query.specimenType,
    pattern: query.pattern,
    fromUtc: query.from ? startOfLabDay(query.from, timeZone) : undefined,
    toUtc: query.to ? endOfLabDay(query.to, timeZone) : undefined,
    sort: query.sort,
    dir: query.dir,
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
}
