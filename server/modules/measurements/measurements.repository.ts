import { Op, type Transaction } from 'sequelize';
import { calculationResultSchema, flagSchema, type CalculationResult } from '@/schemas/assay';
import { assayCodes, type AssayCode } from '@/schemas/common';
import {
  proteinDetailsSchema,
  storedInputsSchema,
  type InputMode,
  type Measurement,
  type ProteinDetails,
  type StoredInputs,
  type WorkupSpecimen,
} from '@/schemas/measurement';
import { z } from 'zod';
import { SpecimenModel } from '../specimens/specimen.model';
import { UserModel } from '../users/user.model';
import { MeasurementModel } from './measurement.model';

const flagsSchema = z.array(flagSchema);

async function userNames(ids: (number | null)[], transaction?: Transaction): Promise<Map<number, string>> {
  const wanted = [...new Set(ids.filter((i): i is number => i !== null))];
  if (wanted.length === 0) return new Map();
  const users = await UserModel.findAll({ where: { id: { [Op.in]: wanted } }, attributes: ['id', 'name'], transaction });
  return new Map(users.map((u) => [u.id, u.name]));
}

function toMeasurement(row: MeasurementModel, names: Map<number, string>): Measurement {
  return {
    id: row.id,
    caseId: row.caseId,
    specimenId: row.specimenId,
    assay: row.assay as AssayCode,
    replicate: row.replicate,
    inputMode: row.inputMode as InputMode,
    inputs: storedInputsSchema.parse(JSON.parse(row.inputs)),
    result: calculationResultSchema.parse(JSON.parse(row.result)),
    definitionId: row.definitionId,
    definitionVersion: row.definitionVersion,
    activity: row.activity,
    flags: flagsSchema.parse(JSON.parse(row.flags)),
    uploadId: row.uploadId,
    enteredBy: row.createdById === null ? null : (names.get(row.createdById) ?? null),
    excluded:
      // A row just created carries no value for these columns at all (undefined), one read back carries null.
      !row.excludedReason || !row.excludedAt
        ? null
        : {
            reason: row.excludedReason,
            by: row.excludedById == null ? null : (names.get(row.excludedById) ?? null),
            at: row.excludedAt.toISOString(),
          },
    submittedAt: row.submittedAt ? row.submittedAt.toISOString() : null,
    version: row.version,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

async function many(rows: MeasurementModel[], transaction?: Transaction): Promise<Measurement[]> {
  const names = await userNames(rows.flatMap((r) => [r.createdById, r.excludedById ?? null]), transaction);
  return rows.map((r) => toMeasurement(r, names));
}

/** A case's measurements by specimen, then in the assays' usual order (CI … CS), then by replicate. */
export async function listMeasurementsOfCase(caseId: number, transaction?: Transaction): Promise<Measurement[]> {
  const rows = await MeasurementModel.findAll({ where: { caseId }, transaction });
  const rank = (a: string) => assayCodes.indexOf(a as AssayCode);
  rows.sort((x, y) => x.specimenId - y.specimenId || rank(x.assay) - rank(y.assay) || x.replicate - y.replicate);
  return many(rows, transaction);
}

export async function listMeasurementsOfSpecimen(specimenId: number, transaction?: Transaction): Promise<Measurement[]> {
  const rows = await MeasurementModel.findAll({ where: { specimenId }, order: [['id', 'ASC']], transaction });
  return many(rows, transaction);
}

export async function findMeasurementById(id: number, transaction?: Transaction): Promise<Measurement | null> {
  const row = await MeasurementModel.findByPk(id, { transaction });
  return row ? (await many([row], transaction))[0]! : null;
}

export async function findMeasurementByKey(
  specimenId: number,
  assay: AssayCode,
  replicate: number,
  transaction?: Transaction,
): Promise<Measurement | null> {
  const row = await MeasurementModel.findOne({ where: { specimenId, assay, replicate }, transaction });
  return row ? (await many([row], transaction))[0]! : null;
}

/** specimenId|assay|replicate of every measurement already saved on these specimens. */
export async function savedKeys(specimenIds: number[], transaction?: Transaction): Promise<Set<string>> {
  if (specimenIds.length === 0) return new Set();
  const rows = await MeasurementModel.findAll({
    where: { specimenId: { [Op.in]: specimenIds } },
    attributes: ['specimenId', 'assay', 'replicate'],
    transaction,
  });
  return new Set(rows.map((r) => `${r.specimenId}|${r.assay}|${r.replicate}`));
}

export async function countMeasurementsOfCase(caseId: number, transaction?: Transaction): Promise<number> {
  return MeasurementModel.count({ where: { caseId }, transaction });
}

export type NewMeasurement = {
  caseId: number;
  specimenId: number;
  assay: AssayCode;
  replicate: number;
  inputs: StoredInputs;
  result: CalculationResult;
  definitionId: number;
  definitionVersion: number;
  uploadId: number | null;
  createdById: number | null;
  /** The analytical run the measurement was read on (a run import); absent for single-case entry. */
  runId?: number | null;
};

export async function insertMeasurement(m: NewMeasurement, transaction: Transaction): Promise<Measurement> {
  const row = await MeasurementModel.create(
    {
      caseId: m.caseId,
      specimenId: m.specimenId,
      assay: m.assay,
      replicate: m.replicate,
      inputMode: m.inputs.mode,
      inputs: JSON.stringify(m.inputs),
      result: JSON.stringify(m.result),
      definitionId: m.definitionId,
      definitionVersion: m.definitionVersion,
      activity: m.result.activity,
      flags: JSON.stringify(m.result.flags),
      uploadId: m.uploadId,
      createdById: m.createdById,
      runId: m.runId ?? null,
    },
    { transaction },
  );
  return (await many([row], transaction))[0]!;
}

/**
 * Replaces inputs and result (and the replicate number when given) only if the version is still
 * `expectedVersion`; false when another save won.
 */
export async function updateMeasurementIfVersion(
  id: number,
  expectedVersion: number,
  changes: { inputs: StoredInputs; result: CalculationResult; definitionId: number; definitionVersion: number; replicate?: number },
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await MeasurementModel.update(
    {
      ...(changes.replicate === undefined ? {} : { replicate: changes.replicate }),
      inputs: JSON.stringify(changes.inputs),
      result: JSON.stringify(changes.result),
      activity: changes.result.activity,
      flags: JSON.stringify(changes.result.flags),
      definitionId: changes.definitionId,
      definitionVersion: changes.definitionVersion,
      version: expectedVersion + 1,
    },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}

/** Leaves a replicate out (with reason, who and when) or counts it again (null), only at `expectedVersion`. */
export async function setExclusionIfVersion(
  id: number,
  expectedVersion: number,
  exclusion: { reason: string; byId: number; at: Date } | null,
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await MeasurementModel.update(
    {
      excludedReason: exclusion?.reason ?? null,
      excludedById: exclusion?.byId ?? null,
      excludedAt: exclusion?.at ?? null,
      version: expectedVersion + 1,
    },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}

/**
 * Marks every measurement of the case that was not yet part of a submission as submitted now. The version is
 * left alone: nobody edited the measurement, and an editor's open form stays valid.
 */
export async function markSubmitted(caseId: number, at: Date, transaction: Transaction): Promise<number> {
  const [count] = await MeasurementModel.update({ submittedAt: at }, { where: { caseId, submittedAt: null }, transaction });
  return count;
}

export async function deleteMeasurementIfVersion(id: number, expectedVersion: number, transaction: Transaction): Promise<boolean> {
  const count = await MeasurementModel.destroy({ where: { id, version: expectedVersion }, transaction });
  return count === 1;
}

/* ---------------------------------------------------------------- specimens as the assay bench sees them */

function parseDetails(text: string | null): ProteinDetails | null {
  if (!text) return null;
  const parsed = proteinDetailsSchema.safeParse(JSON.parse(text));
  return parsed.success ? parsed.data : null;
}

function toWorkupSpecimen(row: SpecimenModel): WorkupSpecimen & { caseId: number } {
  return {
    id: row.id,
    caseId: row.caseId,
    label: row.label,
    type: row.type,
    accepted: row.accepted,
    rejectionReason: row.rejectionReason,
    proteinMgPerMl: row.proteinMgPerMl,
    proteinSource: row.proteinSource,
    proteinDetails: parseDetails(row.proteinDetails),
    version: row.version,
  };
}

export async function listWorkupSpecimens(caseId: number, transaction?: Transaction): Promise<(WorkupSpecimen & { caseId: number })[]> {
  const rows = await SpecimenModel.findAll({ where: { caseId }, order: [['id', 'ASC']], transaction });
  return rows.map(toWorkupSpecimen);
}

export async function findWorkupSpecimen(id: number, transaction?: Transaction): Promise<(WorkupSpecimen & { caseId: number }) | null> {
  const row = await SpecimenModel.findByPk(id, { transaction });
  return row ? toWorkupSpecimen(row) : null;
}

/** Records a specimen's protein only if its version is still `expectedVersion`. */
export async function setSpecimenProteinIfVersion(
  id: number,
  expectedVersion: number,
  protein: { proteinMgPerMl: number; proteinSource: string; proteinDetails: ProteinDetails | null },
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await SpecimenModel.update(
    {
      proteinMgPerMl: protein.proteinMgPerMl,
      proteinSource: protein.proteinSource,
      proteinDetails: protein.proteinDetails ? JSON.stringify(protein.proteinDetails) : null,
      version: expectedVersion + 1,
    },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}
