import type { Sequelize, Transaction } from 'sequelize';
import type { CalculationResult, StoredAssayDefinition } from '@/schemas/assay';
import { caseStateLabels, type CaseState } from '@/schemas/case';
import {
  inputModeLabels,
  type CaseWorkup,
  type CreateMeasurementInput,
  type ExcludeMeasurementInput,
  type IncludeMeasurementInput,
  type Measurement,
  type StoredInputs,
  type UpdateMeasurementInput,
  type WorkupSpecimen,
} from '@/schemas/measurement';
import type { User } from '@/schemas/user';
import { AppError, badInput, conflict, invalidState, notFound, staleVersion } from '../../lib/errors';
import { findDefinitionById, getCurrentDefinition } from '../assay-definitions/assay-definitions.service';
import { recordAudit } from '../audit/audit.service';
import { transitionCase } from '../cases/case-state';
import { findCaseById, type CaseRecord } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { listUploadsOfCase } from '../uploads/uploads.repository';
import { auditSummary, changedValues, computeFromInputs } from './compute';
import * as repo from './measurements.repository';

/** Assay results can be entered or changed until the case is submitted for review. */
export const measurementEditableStates: readonly CaseState[] = ['received', 'in_assay'];

/** The case, when its measurements may still change; INVALID_STATE otherwise. */
export async function loadEditableCase(caseId: number, transaction?: Transaction): Promise<CaseRecord> {
  const c = await findCaseById(caseId, transaction);
  if (!c) throw notFound('Case', caseId);
  if (!measurementEditableStates.includes(c.state)) {
    throw invalidState(
      `Case ${c.accession} is ${caseStateLabels[c.state].toLowerCase()}: its assay results can no longer be changed` +
        (c.state === 'awaiting_review' ? ' unless a director returns it for more work.' : '.'),
    );
  }
  return c;
}

/** A specimen of this case that can carry assay results: accepted, with its protein recorded. */
export async function measurableSpecimen(
  caseId: number,
  specimenId: number,
  field: string,
  transaction?: Transaction,
): Promise<WorkupSpecimen & { proteinMgPerMl: number }> {
  const s = await repo.findWorkupSpecimen(specimenId, transaction);
  if (!s || s.caseId !== caseId) throw badInput({ [field]: `Specimen ${specimenId} is not a specimen of this case` });
  if (!s.accepted) {
    throw badInput({ [field]: `Specimen ${s.label} was rejected on receipt (${s.rejectionReason ?? 'no reason given'}); no assays are recorded on it` });
  }
  if (s.proteinMgPerMl === null) {
    throw badInput({ [field]: `Record the protein concentration of specimen ${s.label} before entering its assays` });
  }
  return { ...s, proteinMgPerMl: s.proteinMgPerMl };
}

/** Saving the first measurement starts the assay stage of a received case (same transaction). */
export async function startAssayIfReceived(sequelize: Sequelize, actor: User, caseId: number, transaction: Transaction): Promise<void> {
  const c = await findCaseById(caseId, transaction);
  if (c && c.state === 'received') await transitionCase(sequelize, actor, caseId, 'in_assay', { version: c.version }, transaction);
}

function storedInputsOf(input: CreateMeasurementInput, proteinMgPerMl: number): StoredInputs {
  const conditions = {
    pathlengthCm: input.pathlengthCm,
    reactionVolumeUl: input.reactionVolumeUl,
    sampleVolumeUl: input.sampleVolumeUl,
    proteinMgPerMl,
  };
  if (input.mode === 'rates') {
    return { mode: 'rates', ...conditions, totalRatePerMin: input.totalRatePerMin, backgroundRatePerMin: input.backgroundRatePerMin };
  }
  return { mode: 'traces', ...conditions, total: input.total, background: input.background, window: input.window };
}

export type MeasurementPreview = { result: CalculationResult; definitionId: number; definitionVersion: number; proteinMgPerMl: number };

/** The result a new measurement would get, with the current definition and the specimen's protein; stores nothing. */
export async function previewMeasurement(caseId: number, input: CreateMeasurementInput): Promise<MeasurementPreview> {
  await loadEditableCase(caseId);
  const s = await measurableSpecimen(caseId, input.specimenId, 'specimenId');
  const current = await getCurrentDefinition(input.assay);
  const result = computeFromInputs(storedInputsOf(input, s.proteinMgPerMl), current.definition);
  return { result, definitionId: current.id, definitionVersion: current.definition.version, proteinMgPerMl: s.proteinMgPerMl };
}

/**
 * 409 naming the replicate that clashes with a saved one, and what to do instead: the next free replicate number
 * when it is known, or leaving the saved one out with a reason (a saved measurement is never silently replaced).
 */
export function alreadySaved(label: string, assay: string, replicate: number, field = 'replicate', nextFree?: number): AppError {
  const instead = nextFree ? `save this one as replicate ${nextFree}, the next free number` : 'use a replicate number not yet saved';
  const message = `Replicate ${replicate} of ${assay} is already saved for specimen ${label}: ${instead}, or, if the saved one is wrong, exclude it with a reason under Saved measurements`;
  return new AppError('CONFLICT', message, { fields: { [field]: message } });
}

/** The lowest replicate number of this assay not yet saved on the specimen. */
async function nextFreeReplicate(specimenId: number, assay: string, t: Transaction): Promise<number> {
  const keys = await repo.savedKeys([specimenId], t);
  let n = 1;
  while (keys.has(`${specimenId}|${assay}|${n}`)) n += 1;
  return n;
}

export async function createMeasurement(
  sequelize: Sequelize,
  actor: User,
  caseId: number,
  input: CreateMeasurementInput,
): Promise<Measurement> {
  const current = await getCurrentDefinition(input.assay);
  return writeTransaction(sequelize, async (t) => {
    await loadEditableCase(caseId, t);
    const s = await measurableSpecimen(caseId, input.specimenId, 'specimenId', t);
    if (await repo.findMeasurementByKey(s.id, input.assay, input.replicate, t)) {
      throw alreadySaved(s.label, input.assay, input.replicate, 'replicate', await nextFreeReplicate(s.id, input.assay, t));
    }
    const inputs = storedInputsOf(input, s.proteinMgPerMl);
    const result = computeFromInputs(inputs, current.definition);
    const m = await repo.insertMeasurement(
      {
        caseId,
        specimenId: s.id,
        assay: input.assay,
        replicate: input.replicate,
        inputs,
        result,
        definitionId: current.id,
        definitionVersion: current.definition.version,
        uploadId: null,
        createdById: actor.id,
      },
      t,
    );
    await recordAudit(actor, { action: 'create', entity: 'measurement', entityId: m.id, caseId, after: auditSummary(m) }, t);
    await startAssayIfReceived(sequelize, actor, caseId, t);
    return m;
  });
}

export async function updateMeasurement(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: UpdateMeasurementInput,
): Promise<Measurement> {
  return writeTransaction(sequelize, async (t) => {
    const before = await repo.findMeasurementById(id, t);
    if (!before) throw notFound('Measurement', id);
    await loadEditableCase(before.caseId, t);
    if (input.version !== before.version) throw staleVersion('measurement');
    if (input.mode !== before.inputMode) {
      throw badInput({ mode: `This measurement was entered as ${inputModeLabels[before.inputMode].toLowerCase()}; delete it and enter it again to change how it is entered` });
    }
    const s = await measurableSpecimen(before.caseId, before.specimenId, 'specimenId', t);
    let inputs: StoredInputs;
    if (input.mode === 'plate' && before.inputs.mode === 'plate') {
      inputs = { ...before.inputs, proteinMgPerMl: s.proteinMgPerMl, window: input.window };
    } else if (input.mode === 'rates') {
      const { version: _v, ...rest } = input;
      inputs = { ...rest, proteinMgPerMl: s.proteinMgPerMl };
    } else if (input.mode === 'traces') {
      const { version: _v, ...rest } = input;
      inputs = { ...rest, proteinMgPerMl: s.proteinMgPerMl };
    } else {
      throw badInput({ mode: 'The stored inputs of this measurement cannot be read' });
    }
    const replicate = input.replicate ?? before.replicate;
    if (replicate !== before.replicate && (await repo.findMeasurementByKey(before.specimenId, before.assay, replicate, t))) {
      throw alreadySaved(s.label, before.assay, replicate, 'replicate', await nextFreeReplicate(before.specimenId, before.assay, t));
    }
    const current = await getCurrentDefinition(before.assay);
    const result = computeFromInputs(inputs, current.definition);
    const changes = { inputs, result, definitionId: current.id, definitionVersion: current.definition.version, replicate };
    if (!(await repo.updateMeasurementIfVersion(id, input.version, changes, t))) throw staleVersion('measurement');
    const after = (await repo.findMeasurementById(id, t))!;
    // Only the values that changed, before and after (the readings themselves stay on the row).
    const diff = changedValues(auditSummary(before), auditSummary(after));
    await recordAudit(
      actor,
      {
        action: 'update',
        entity: 'measurement',
        entityId: id,
        caseId: before.caseId,
        ...diff,
        note: `${before.assay} replicate ${before.replicate} of specimen ${s.label} changed`,
      },
      t,
    );
    return after;
  });
}

/**
 * Deletes a measurement that was never part of a submission for review. Once submitted, a replicate is part of
 * what the director saw (and perhaps of a signed report): it can be excluded with a reason, never deleted.
 */
export async function deleteMeasurement(sequelize: Sequelize, actor: User, id: number, version: number): Promise<void> {
  await writeTransaction(sequelize, async (t) => {
    const before = await repo.findMeasurementById(id, t);
    if (!before) throw notFound('Measurement', id);
    await loadEditableCase(before.caseId, t);
    if (before.submittedAt) {
      throw conflict(
        `${before.assay} replicate ${before.replicate} was part of a submission for review on ${before.submittedAt.slice(0, 10)}, so it cannot be deleted: exclude it with a reason instead.`,
      );
    }
    if (version !== before.version || !(await repo.deleteMeasurementIfVersion(id, version, t))) throw staleVersion('measurement');
    await recordAudit(actor, { action: 'delete', entity: 'measurement', entityId: id, caseId: before.caseId, before: auditSummary(before) }, t);
  });
}

async function loadForExclusion(id: number, version: number, t: Transaction): Promise<Measurement> {
  const m = await repo.findMeasurementById(id, t);
  if (!m) throw notFound('Measurement', id);
  await loadEditableCase(m.caseId, t);
  if (version !== m.version) throw staleVersion('measurement');
  return m;
}

/**
 * Leaves a replicate out of the mean, SD, CV, ratios and pattern of its assay, with the reason; it stays on the
 * bench, on the results and in the report's methods section. Audited with the reason in the same transaction.
 */
export async function excludeMeasurement(sequelize: Sequelize, actor: User, id: number, input: ExcludeMeasurementInput): Promise<Measurement> {
  return writeTransaction(sequelize, async (t) => {
    const m = await loadForExclusion(id, input.version, t);
    if (m.excluded) {
      throw conflict(`${m.assay} replicate ${m.replicate} is already excluded (${m.excluded.reason}); include it again before giving another reason.`);
    }
    const at = new Date();
    if (!(await repo.setExclusionIfVersion(id, input.version, { reason: input.reason, byId: actor.id, at }, t))) throw staleVersion('measurement');
    await recordAudit(
      actor,
      {
        action: 'exclude',
        entity: 'measurement',
        entityId: id,
        caseId: m.caseId,
        before: { excluded: null },
        after: { excluded: input.reason, assay: m.assay, replicate: m.replicate, activity: m.activity },
        note: input.reason,
      },
      t,
    );
    return (await repo.findMeasurementById(id, t))!;
  });
}

/** Counts an excluded replicate again; the reason it was excluded stays in the audit trail. */
export async function includeMeasurement(sequelize: Sequelize, actor: User, id: number, input: IncludeMeasurementInput): Promise<Measurement> {
  return writeTransaction(sequelize, async (t) => {
    const m = await loadForExclusion(id, input.version, t);
    if (!m.excluded) throw conflict(`${m.assay} replicate ${m.replicate} is not excluded.`);
    if (!(await repo.setExclusionIfVersion(id, input.version, null, t))) throw staleVersion('measurement');
    await recordAudit(
      actor,
      {
        action: 'include',
        entity: 'measurement',
        entityId: id,
        caseId: m.caseId,
        before: { excluded: m.excluded.reason },
        after: { excluded: null, assay: m.assay, replicate: m.replicate, activity: m.activity },
        note: `Counted again; it had been excluded by ${m.excluded.by ?? 'an unknown account'}: ${m.excluded.reason}`,
      },
      t,
    );
    return (await repo.findMeasurementById(id, t))!;
  });
}

/**
 * A specimen's protein changed: every measurement on it is computed again with the new value, each keeping the
 * definition version it was computed with, and each change is audited. Runs in the caller's transaction.
 */
export async function recomputeForProtein(actor: User, specimenId: number, proteinMgPerMl: number, transaction: Transaction): Promise<number> {
  const measurements = await repo.listMeasurementsOfSpecimen(specimenId, transaction);
  const definitions = new Map<number, StoredAssayDefinition>();
  for (const m of measurements) {
    let d = definitions.get(m.definitionId);
    if (!d) {
      d = (await findDefinitionById(m.definitionId)) ?? undefined;
      if (!d) throw notFound('Assay definition', m.definitionId);
      definitions.set(m.definitionId, d);
    }
    const inputs: StoredInputs = { ...m.inputs, proteinMgPerMl };
    const result = computeFromInputs(inputs, d.definition);
    const changes = { inputs, result, definitionId: m.definitionId, definitionVersion: m.definitionVersion };
    if (!(await repo.updateMeasurementIfVersion(m.id, m.version, changes, transaction))) throw staleVersion('measurement');
    await recordAudit(
      actor,
      {
        action: 'recompute',
        entity: 'measurement',
        entityId: m.id,
        caseId: m.caseId,
        before: auditSummary(m),
        after: auditSummary({ ...m, inputs, result }),
        note: `Protein of the specimen changed from ${m.inputs.proteinMgPerMl} to ${proteinMgPerMl} mg/mL`,
      },
      transaction,
    );
  }
  return measurements.length;
}

/** Everything the assay bench shows for one case. */
export async function getCaseWorkup(caseId: number): Promise<CaseWorkup> {
  const c = await findCaseById(caseId);
  if (!c) throw notFound('Case', caseId);
  const [specimens, measurements, uploads] = await Promise.all([
    repo.listWorkupSpecimens(caseId),
    repo.listMeasurementsOfCase(caseId),
    listUploadsOfCase(caseId),
  ]);
  return {
    caseId: c.id,
    accession: c.accession,
    patientName: c.patientName,
    state: c.state,
    version: c.version,
    returnReason: c.returnReason,
    editable: measurementEditableStates.includes(c.state),
    specimens: specimens.map(({ caseId: _c, ...s }) => s),
    measurements,
    uploads,
  };
}

export async function listCaseMeasurements(caseId: number): Promise<Measurement[]> {
  if (!(await findCaseById(caseId))) throw notFound('Case', caseId);
  return repo.listMeasurementsOfCase(caseId);
}
