import { Op, type Transaction } from 'sequelize';
import type { AssayCode } from '@/schemas/common';
import type { ControlMaterial, ControlMaterialDetail, ControlTarget, RunQcStatus } from '@/schemas/qc';
import { AnalyticalRunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { ControlMaterialModel, ControlResultModel, ControlTargetModel } from './qc.model';

/*
 * The only code that touches the control-material, control-target and control-result tables; answers are plain
 * objects typed by the shared schemas in src/schemas/qc.ts.
 */

async function userNames(ids: (number | null)[], transaction?: Transaction): Promise<Map<number, string>> {
  const distinct = [...new Set(ids.filter((id): id is number => id !== null))];
  if (distinct.length === 0) return new Map();
  const rows = await UserModel.findAll({ where: { id: distinct }, attributes: ['id', 'name'], transaction });
  return new Map(rows.map((r) => [r.id, r.name]));
}

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);

export async function toTargets(rows: ControlTargetModel[], transaction?: Transaction): Promise<ControlTarget[]> {
  const names = await userNames(rows.flatMap((r) => [r.createdById, r.approvedById ?? null]), transaction);
  return rows.map((r) => ({
    id: r.id,
    controlMaterialId: r.controlMaterialId,
    assayCode: r.assayCode as AssayCode,
    version: r.version,
    mean: r.mean,
    sd: r.sd,
    source: r.source,
    basis: r.basis ? (JSON.parse(r.basis) as ControlTarget['basis']) : null,
    status: r.status,
    note: r.note,
    createdById: r.createdById,
    createdByName: r.createdById === null ? null : (names.get(r.createdById) ?? null),
    approvedById: r.approvedById ?? null,
    approvedByName: r.approvedById ? (names.get(r.approvedById) ?? null) : null,
    approvedAt: iso(r.approvedAt),
    retiredAt: iso(r.retiredAt),
    createdAt: iso(r.createdAt)!,
  }));
}

async function approvedAssaysByMaterial(ids: number[], transaction?: Transaction): Promise<Map<number, AssayCode[]>> {
  const rows = ids.length
    ? await ControlTargetModel.findAll({
        where: { controlMaterialId: ids, status: 'approved' },
        attributes: ['controlMaterialId', 'assayCode'],
        order: [['assayCode', 'ASC']],
        transaction,
      })
    : [];
  const map = new Map<number, AssayCode[]>();
  for (const r of rows) map.set(r.controlMaterialId, [...(map.get(r.controlMaterialId) ?? []), r.assayCode as AssayCode]);
  return map;
}

function toMaterial(row: ControlMaterialModel, approved: Map<number, AssayCode[]>): ControlMaterial {
  return {
    id: row.id,
    name: row.name,
    lot: row.lot,
    level: row.level,
    expiresOn: row.expiresOn,
    description: row.description,
    retiredAt: iso(row.retiredAt),
    version: row.version,
    approvedAssays: approved.get(row.id) ?? [],
    createdAt: iso(row.createdAt)!,
  };
}

export async function listMaterials(): Promise<ControlMaterial[]> {
  const rows = await ControlMaterialModel.findAll({ order: [['name', 'ASC'], ['lot', 'ASC'], ['level', 'ASC']] });
  const approved = await approvedAssaysByMaterial(rows.map((r) => r.id));
  return rows.map((r) => toMaterial(r, approved));
}

export async function findMaterialRow(id: number, transaction?: Transaction): Promise<ControlMaterialModel | null> {
  return ControlMaterialModel.findByPk(id, { transaction });
}

export async function findMaterial(id: number, transaction?: Transaction): Promise<ControlMaterialDetail | null> {
  const row = await findMaterialRow(id, transaction);
  if (!row) return null;
  const targets = await ControlTargetModel.findAll({
    where: { controlMaterialId: id },
    order: [['assayCode', 'ASC'], ['version', 'DESC']],
    transaction,
  });
  return { ...toMaterial(row, await approvedAssaysByMaterial([id], transaction)), targets: await toTargets(targets, transaction) };
}

export async function findTargetRow(id: number, transaction?: Transaction): Promise<ControlTargetModel | null> {
  return ControlTargetModel.findByPk(id, { transaction });
}

export async function nextTargetVersion(controlMaterialId: number, assayCode: string, transaction: Transaction): Promise<number> {
  const latest = (await ControlTargetModel.max('version', { where: { controlMaterialId, assayCode }, transaction })) as
    | number
    | null;
  return (latest ?? 0) + 1;
}

/** The approved target of each given material for one assay (at most one per material and assay). */
export async function approvedTargets(assayCode: string, materialIds?: number[], transaction?: Transaction): Promise<ControlTargetModel[]> {
  return ControlTargetModel.findAll({
    where: { assayCode, status: 'approved', ...(materialIds ? { controlMaterialId: materialIds } : {}) },
    order: [['controlMaterialId', 'ASC']],
    transaction,
  });
}

/** Approved and retired-after-approval targets of one material and assay, oldest first (the chart's lines). */
export async function everApprovedTargets(controlMaterialId: number, assayCode: string): Promise<ControlTarget[]> {
  const rows = await ControlTargetModel.findAll({
    where: { controlMaterialId, assayCode, approvedAt: { [Op.ne]: null } },
    order: [['approvedAt', 'ASC'], ['version', 'ASC']],
  });
  return toTargets(rows);
}

/** One stored control result with the run it came from. */
export interface ControlHistoryEntry {
  resultId: number;
  runId: number;
  runNumber: string;
  startedAt: Date;
  measuredAt: Date;
  value: number;
  z: number | null;
  controlTargetId: number | null;
  runStatus: RunQcStatus;
  overridden: boolean;
}

/**
 * Control results of one material and assay in run order (run start, then run id). `before` keeps only runs that
 * started earlier than a given run (ties broken by id); `newestFirst` with `limit` gives the last few.
 */
export async function listControlResults(
  controlMaterialId: number,
  assayCode: string,
  opts: { before?: { startedAt: Date; runId: number | null }; limit?: number; newestFirst?: boolean } = {},
  transaction?: Transaction,
): Promise<ControlHistoryEntry[]> {
  const runWhere = opts.before
    ? {
        [Op.or]: [
          { startedAt: { [Op.lt]: opts.before.startedAt } },
          ...(opts.before.runId === null ? [] : [{ startedAt: opts.before.startedAt, id: { [Op.lt]: opts.before.runId } }]),
        ],
        ...(opts.before.runId === null ? {} : { id: { [Op.ne]: opts.before.runId } }),
      }
    : {};
  const direction = opts.newestFirst ? 'DESC' : 'ASC';
  const results = await ControlResultModel.findAll({ where: { controlMaterialId, assayCode }, transaction });
  if (results.length === 0) return [];
  const runs = await AnalyticalRunModel.findAll({
    where: { [Op.and]: [{ id: results.map((r) => r.runId) }, runWhere] },
    attributes: ['id', 'runNumber', 'startedAt', 'qcStatus', 'overrideAt'],
    order: [['startedAt', direction], ['id', direction]],
    transaction,
  });
  const byRun = new Map(results.map((r) => [r.runId, r]));
  const entries: ControlHistoryEntry[] = [];
  for (const run of runs) {
    const r = byRun.get(run.id);
    if (!r) continue;
    entries.push({
      resultId: r.id,
      runId: run.id,
      runNumber: run.runNumber,
      startedAt: new Date(run.startedAt),
      measuredAt: new Date(r.measuredAt),
      value: r.value,
      z: r.z,
      controlTargetId: r.controlTargetId,
      runStatus: run.qcStatus,
      overridden: run.overrideAt !== null && run.overrideAt !== undefined,
    });
    if (opts.limit !== undefined && entries.length >= opts.limit) break;
  }
  return entries;
}
