import { Op, type Transaction, type WhereOptions } from 'sequelize';
import { flagSchema } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import {
  runViolationSchema,
  runWellSchema,
  type OpenSpecimen,
  type RunMeasurement,
  type RunQcStamp,
  type RunQcStatus,
  type RunSummary,
  type RunViolation,
  type RunWell,
} from '@/schemas/run';
import type { PlateFormat } from '@/schemas/plate';
import { z } from 'zod';
import { CaseModel } from '../cases/case.model';
import { MeasurementModel } from '../measurements/measurement.model';
import { ControlMaterialModel, ControlResultModel, ControlTargetModel } from '../qc/qc.model';
import { SpecimenModel } from '../specimens/specimen.model';
import { UploadModel } from '../uploads/upload.model';
import { UserModel } from '../users/user.model';
import { AnalyticalRunModel } from './run.model';

/** Kind of the upload that holds a run's plate file. */
export const RUN_UPLOAD_KIND = 'run-plate';

/** What the layout column holds: the wells and the reading conditions of the import. */
const storedLayoutSchema = z.object({ wells: z.array(runWellSchema), pathlengthCm: z.number().nullable() });
const violationsSchema = z.array(runViolationSchema);

export type RunRow = AnalyticalRunModel;

export async function findRunRow(id: number, transaction?: Transaction): Promise<AnalyticalRunModel | null> {
  return AnalyticalRunModel.findByPk(id, { transaction });
}

export function layoutOf(row: AnalyticalRunModel): { wells: RunWell[]; pathlengthCm: number | null } {
  return storedLayoutSchema.parse(JSON.parse(row.layout));
}

export function violationsOf(row: AnalyticalRunModel): RunViolation[] {
  return violationsSchema.parse(JSON.parse(row.qcViolations));
}

/** The next run number of the year, RUN-2026-0007 (inside the write transaction, so two imports never share one). */
export async function nextRunNumber(year: number, transaction: Transaction): Promise<string> {
  const prefix = `RUN-${year}-`;
  const last = await AnalyticalRunModel.findOne({
    where: { runNumber: { [Op.like]: `${prefix}%` } },
    order: [['runNumber', 'DESC']],
    attributes: ['runNumber'],
    transaction,
  });
  const n = last ? Number(last.runNumber.slice(prefix.length)) + 1 : 1;
  return `${prefix}${String(n).padStart(4, '0')}`;
}

/** A run already imported from a file with this SHA-256, if any. */
export async function findRunByFileSha(sha256: string, transaction?: Transaction): Promise<AnalyticalRunModel | null> {
  const upload = await UploadModel.findOne({ where: { kind: RUN_UPLOAD_KIND, sha256 }, attributes: ['id'], transaction });
  return upload ? AnalyticalRunModel.findOne({ where: { uploadId: upload.id }, transaction }) : null;
}

export type NewRun = {
  runNumber: string;
  instrument: string;
  startedAt: Date;
  operatorId: number;
  plateFormat: PlateFormat;
  wells: RunWell[];
  pathlengthCm: number;
  definitionVersions: Record<string, number>;
  uploadId: number;
  qcStatus: RunQcStatus;
  violations: RunViolation[];
};

export async function insertRun(run: NewRun, transaction: Transaction): Promise<AnalyticalRunModel> {
  return AnalyticalRunModel.create(
    {
      runNumber: run.runNumber,
      instrument: run.instrument,
      startedAt: run.startedAt,
      operatorId: run.operatorId,
      plateFormat: run.plateFormat,
      layout: JSON.stringify({ wells: run.wells, pathlengthCm: run.pathlengthCm }),
      definitionVersions: JSON.stringify(run.definitionVersions),
      uploadId: run.uploadId,
      qcStatus: run.qcStatus,
      qcViolations: JSON.stringify(run.violations),
    },
    { transaction },
  );
}

export type NewControlResult = {
  runId: number;
  controlMaterialId: number;
  assayCode: AssayCode;
  value: number;
  wells: unknown;
  controlTargetId: number | null;
  z: number | null;
  measuredAt: Date;
};

export async function insertControlResult(r: NewControlResult, transaction: Transaction): Promise<number> {
  const row = await ControlResultModel.create({ ...r, wells: JSON.stringify(r.wells) }, { transaction });
  return row.id;
}

/** Records a director's release only if the run's version is still the one read. */
export async function setOverrideIfVersion(
  id: number,
  expectedVersion: number,
  override: { reason: string; byId: number; at: Date },
  transaction: Transaction,
): Promise<boolean> {
  const [n] = await AnalyticalRunModel.update(
    { overrideReason: override.reason, overrideById: override.byId, overrideAt: override.at, version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  return n === 1;
}

async function userNames(ids: (number | null)[], transaction?: Transaction): Promise<Map<number, string>> {
  const wanted = [...new Set(ids.filter((i): i is number => i !== null))];
  if (wanted.length === 0) return new Map();
  const users = await UserModel.findAll({ where: { id: { [Op.in]: wanted } }, attributes: ['id', 'name'], transaction });
  return new Map(users.map((u) => [u.id, u.name]));
}

/** List items of these runs, with their counts of cases, measurements and control results. */
export async function toSummaries(rows: AnalyticalRunModel[], transaction?: Transaction): Promise<RunSummary[]> {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const [names, measurements, controls] = await Promise.all([
    userNames(rows.flatMap((r) => [r.operatorId, r.overrideById ?? null]), transaction),
    MeasurementModel.findAll({ where: { runId: { [Op.in]: ids } }, attributes: ['runId', 'caseId'], transaction }),
    ControlResultModel.findAll({ where: { runId: { [Op.in]: ids } }, attributes: ['runId'], transaction }),
  ]);
  return rows.map((r) => {
    const mine = measurements.filter((m) => m.runId === r.id);
    return {
      id: r.id,
      runNumber: r.runNumber,
      instrument: r.instrument,
      startedAt: new Date(r.startedAt).toISOString(),
      operator: r.operatorId === null ? null : (names.get(r.operatorId) ?? null),
      plateFormat: r.plateFormat as PlateFormat,
      qcStatus: r.qcStatus,
      violations: violationsOf(r),
      override:
        r.overrideReason && r.overrideAt
          ? {
              reason: r.overrideReason,
              by: r.overrideById == null ? null : (names.get(r.overrideById) ?? null),
              at: new Date(r.overrideAt).toISOString(),
            }
          : null,
      caseCount: new Set(mine.map((m) => m.caseId)).size,
      measurementCount: mine.length,
      controlCount: controls.filter((c) => c.runId === r.id).length,
      createdAt: new Date(r.createdAt).toISOString(),
    };
  });
}

/** A page of runs, newest first. */
export async function listRuns(
  q: { page: number; pageSize: number; status?: RunQcStatus; text?: string },
): Promise<{ rows: AnalyticalRunModel[]; total: number }> {
  const where: WhereOptions[] = [];
  if (q.status) where.push({ qcStatus: q.status });
  if (q.text) {
    const like = `%${q.text}%`;
    where.push({ [Op.or]: [{ runNumber: { [Op.like]: like } }, { instrument: { [Op.like]: like } }] });
  }
  const { rows, count } = await AnalyticalRunModel.findAndCountAll({
    where: { [Op.and]: where },
    order: [['startedAt', 'DESC'], ['id', 'DESC']],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  return { rows, total: count };
}

export async function controlResultsOfRun(runId: number, transaction?: Transaction): Promise<ControlResultModel[]> {
  return ControlResultModel.findAll({ where: { runId }, order: [['id', 'ASC']], transaction });
}

export async function controlMaterialRows(ids: number[], transaction?: Transaction): Promise<Map<number, ControlMaterialModel>> {
  if (ids.length === 0) return new Map();
  const rows = await ControlMaterialModel.findAll({ where: { id: { [Op.in]: [...new Set(ids)] } }, transaction });
  return new Map(rows.map((r) => [r.id, r]));
}

export async function targetsById(ids: number[], transaction?: Transaction): Promise<Map<number, ControlTargetModel>> {
  if (ids.length === 0) return new Map();
  const rows = await ControlTargetModel.findAll({ where: { id: { [Op.in]: [...new Set(ids)] } }, transaction });
  return new Map(rows.map((r) => [r.id, r]));
}

const flagsSchema = z.array(flagSchema);

/** The measurements a run produced, with their case accession and specimen label. */
export async function measurementsOfRun(runId: number): Promise<RunMeasurement[]> {
  const rows = await MeasurementModel.findAll({ where: { runId }, order: [['caseId', 'ASC'], ['specimenId', 'ASC'], ['assay', 'ASC'], ['replicate', 'ASC']] });
  if (rows.length === 0) return [];
  const [cases, specimens] = await Promise.all([
    CaseModel.findAll({ where: { id: { [Op.in]: [...new Set(rows.map((r) => r.caseId))] } }, attributes: ['id', 'accession'] }),
    SpecimenModel.findAll({ where: { id: { [Op.in]: [...new Set(rows.map((r) => r.specimenId))] } }, attributes: ['id', 'label'] }),
  ]);
  const accession = new Map(cases.map((c) => [c.id, c.accession]));
  const label = new Map(specimens.map((s) => [s.id, s.label]));
  return rows.map((r) => ({
    id: r.id,
    caseId: r.caseId,
    accession: accession.get(r.caseId) ?? '',
    specimenId: r.specimenId,
    specimenLabel: label.get(r.specimenId) ?? '',
    assay: r.assay as AssayCode,
    replicate: r.replicate,
    activity: r.activity,
    flags: flagsSchema.parse(JSON.parse(r.flags)),
    excluded: !!r.excludedAt,
  }));
}

/** The run of each of these measurements that came from a run, with its QC release. */
export async function runStampsOfMeasurements(measurementIds: number[], transaction?: Transaction): Promise<Map<number, RunQcStamp>> {
  if (measurementIds.length === 0) return new Map();
  const ms = await MeasurementModel.findAll({
    where: { id: { [Op.in]: measurementIds }, runId: { [Op.ne]: null } },
    attributes: ['id', 'runId'],
    transaction,
  });
  if (ms.length === 0) return new Map();
  const runs = await AnalyticalRunModel.findAll({
    where: { id: { [Op.in]: [...new Set(ms.map((m) => m.runId!))] } },
    attributes: ['id', 'runNumber', 'qcStatus', 'overrideReason'],
    transaction,
  });
  const byId = new Map(runs.map((r) => [r.id, r]));
  const stamps = new Map<number, RunQcStamp>();
  for (const m of ms) {
    const run = byId.get(m.runId!);
    if (run) stamps.set(m.id, { runId: run.id, runNumber: run.runNumber, qcStatus: run.qcStatus, overrideReason: run.overrideReason ?? null });
  }
  return stamps;
}

/** Accepted specimens of cases still open to assay work, newest case first. */
export async function openSpecimens(states: readonly string[]): Promise<OpenSpecimen[]> {
  const cases = await CaseModel.findAll({
    where: { state: { [Op.in]: [...states] } },
    attributes: ['id', 'accession', 'patientName', 'state'],
    order: [['id', 'DESC']],
  });
  if (cases.length === 0) return [];
  const specimens = await SpecimenModel.findAll({
    where: { caseId: { [Op.in]: cases.map((c) => c.id) }, accepted: true },
    order: [['id', 'ASC']],
  });
  const saved = await MeasurementModel.findAll({
    where: { specimenId: { [Op.in]: specimens.map((s) => s.id) } },
    attributes: ['specimenId', 'assay', 'replicate'],
  });
  const byCase = new Map(cases.map((c) => [c.id, c]));
  return cases.flatMap((c) =>
    specimens
      .filter((s) => s.caseId === c.id)
      .map((s) => ({
        specimenId: s.id,
        label: s.label,
        type: s.type,
        caseId: s.caseId,
        accession: byCase.get(s.caseId)!.accession,
        patientName: byCase.get(s.caseId)!.patientName,
        caseState: byCase.get(s.caseId)!.state,
        proteinMgPerMl: s.proteinMgPerMl,
        saved: saved
          .filter((m) => m.specimenId === s.id)
          .map((m) => ({ assay: m.assay as AssayCode, replicate: m.replicate }))
          .sort((a, b) => a.assay.localeCompare(b.assay) || a.replicate - b.replicate),
      })),
  );
}
