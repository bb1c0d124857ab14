import type { Sequelize, Transaction } from 'sequelize';
import type { AssayCode } from '@/schemas/common';
import {
  ESTABLISH_FROM_RESULTS,
  type ControlChart,
  type ControlMaterial,
  type ControlMaterialDetail,
  type ControlTarget,
  type CreateControlMaterialBody,
  type CreateControlTargetBody,
  type PatchControlMaterialBody,
} from '@/schemas/qc';
import type { User } from '@/schemas/user';
import { mean, sampleSd } from '../../domain/reference-stats/descriptive';
import { writeTransaction } from '../../db/write-transaction';
import { AppError, badInput, invalidState, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { checkApprover, SELF_APPROVAL_NOTE } from '../lab-profile/lab-profile.service';
import { ControlMaterialModel, ControlTargetModel } from './qc.model';
import * as repo from './qc.repository';
import { controlHistory } from './run-evaluation';

const MATERIAL = 'control-material';
const TARGET = 'control-target';

export const listMaterials = (): Promise<ControlMaterial[]> => repo.listMaterials();

export async function getMaterial(id: number, transaction?: Transaction): Promise<ControlMaterialDetail> {
  const found = await repo.findMaterial(id, transaction);
  if (!found) throw notFound('Control material', id);
  return found;
}

export async function createMaterial(sequelize: Sequelize, actor: User, body: CreateControlMaterialBody): Promise<ControlMaterialDetail> {
  return writeTransaction(sequelize, async (transaction) => {
    const clash = await ControlMaterialModel.findOne({ where: { name: body.name, lot: body.lot, level: body.level }, transaction });
    if (clash) {
      throw new AppError('CONFLICT', `${body.name}, lot ${body.lot}, level ${body.level} is already recorded`, {
        fields: { level: 'This material, lot and level already exist' },
      });
    }
    const row = await ControlMaterialModel.create({ ...body, createdById: actor.id }, { transaction });
    const after = await getMaterial(row.id, transaction);
    await recordAudit(actor, { action: 'create', entity: MATERIAL, entityId: row.id, after }, transaction);
    return after;
  });
}

/** Edits the material's details, or retires it (retired: true) or brings it back; the version seen must match. */
export async function patchMaterial(
  sequelize: Sequelize,
  actor: User,
  id: number,
  body: PatchControlMaterialBody,
): Promise<ControlMaterialDetail> {
  return writeTransaction(sequelize, async (transaction) => {
    const before = await getMaterial(id, transaction);
    const { version, retired, ...details } = body;
    const changes: Partial<ControlMaterialModel> = { ...details };
    if (retired !== undefined) changes.retiredAt = retired ? (before.retiredAt ? new Date(before.retiredAt) : new Date()) : null;
    const [count] = await ControlMaterialModel.update(
      { ...changes, version: version + 1 },
      { where: { id, version }, transaction },
    );
    if (count !== 1) throw staleVersion('control material');
    const after = await getMaterial(id, transaction);
    const action = retired === true && !before.retiredAt ? 'retire' : 'update';
    await recordAudit(actor, { action, entity: MATERIAL, entityId: id, before, after }, transaction);
    return after;
  });
}

async function insertDraftTarget(
  actor: User,
  material: ControlMaterialDetail,
  values: Pick<ControlTarget, 'assayCode' | 'mean' | 'sd' | 'source' | 'basis' | 'note'>,
  transaction: Transaction,
): Promise<ControlTarget> {
  if (material.retiredAt) throw invalidState(`${material.name} (lot ${material.lot}) is retired; bring it back before adding targets`);
  const row = await ControlTargetModel.create(
    {
      controlMaterialId: material.id,
      assayCode: values.assayCode,
      version: await repo.nextTargetVersion(material.id, values.assayCode, transaction),
      mean: values.mean,
      sd: values.sd,
      source: values.source,
      basis: values.basis ? JSON.stringify(values.basis) : null,
      note: values.note,
      createdById: actor.id,
    },
    { transaction },
  );
  const [target] = await repo.toTargets([row], transaction);
  await recordAudit(actor, { action: 'create', entity: TARGET, entityId: row.id, after: target }, transaction);
  return target!;
}

/** A director's target mean and SD for one assay: a draft, the next version of that material and assay. */
export async function enterTarget(
  sequelize: Sequelize,
  actor: User,
  materialId: number,
  body: CreateControlTargetBody,
): Promise<ControlTarget> {
  return writeTransaction(sequelize, async (transaction) =>
    insertDraftTarget(actor, await getMaterial(materialId, transaction), { ...body, source: 'entered', basis: null }, transaction),
  );
}

/**
 * A draft target computed from the material's first 20 control results for the assay, in run order: their mean
 * and sample SD (n − 1 denominator). The basis names the results, so the computation can be checked later.
 */
export async function establishTarget(
  sequelize: Sequelize,
  actor: User,
  materialId: number,
  assayCode: AssayCode,
): Promise<ControlTarget> {
  return writeTransaction(sequelize, async (transaction) => {
    const material = await getMaterial(materialId, transaction);
    const history = await controlHistory(materialId, assayCode, transaction);
    if (history.length < ESTABLISH_FROM_RESULTS) {
      throw badInput(
        {
          assayCode:
            `${history.length} control result${history.length === 1 ? '' : 's'} of this material for ${assayCode} ` +
            `exist; ${ESTABLISH_FROM_RESULTS} are needed to establish a target`,
        },
        `Not enough control results to establish a target (${history.length} of ${ESTABLISH_FROM_RESULTS})`,
      );
    }
    const first = history.slice(0, ESTABLISH_FROM_RESULTS);
    const values = first.map((h) => h.value);
    const sd = sampleSd(values)!;
    if (!(sd > 0)) {
      throw badInput({ assayCode: 'The first 20 control results are all equal, so their SD is 0; enter a target instead' });
    }
    const basis = {
      resultIds: first.map((h) => h.resultId),
      n: first.length,
      firstRunId: first[0]!.runId,
      lastRunId: first.at(-1)!.runId,
      sd: 'sample (n − 1)' as const,
    };
    const note = `Established from the first ${ESTABLISH_FROM_RESULTS} control results (runs ${first[0]!.runNumber} to ${first.at(-1)!.runNumber})`;
    return insertDraftTarget(actor, material, { assayCode, mean: mean(values), sd, source: 'established', basis, note }, transaction);
  });
}

/**
 * Puts a draft target in force. The approved version of the same material and assay it replaces is retired in
 * the same transaction. A director other than the drafter approves, unless the laboratory allows self-approval.
 */
export async function approveTarget(sequelize: Sequelize, actor: User, targetId: number): Promise<ControlTarget> {
  return writeTransaction(sequelize, async (transaction) => {
    const row = await repo.findTargetRow(targetId, transaction);
    if (!row) throw notFound('Control target', targetId);
    if (row.status !== 'draft') throw invalidState(`Version ${row.version} is ${row.status}; only a draft can be approved`);
    const { selfApproved } = await checkApprover(actor, row.createdById, 'this target', transaction);
    const [before] = await repo.toTargets([row], transaction);
    const now = new Date();
    for (const previous of await repo.approvedTargets(row.assayCode, [row.controlMaterialId], transaction)) {
      const [was] = await repo.toTargets([previous], transaction);
      await previous.update({ status: 'retired', retiredAt: now }, { transaction });
      const [retired] = await repo.toTargets([previous], transaction);
      await recordAudit(
        actor,
        { action: 'retire', entity: TARGET, entityId: previous.id, before: was, after: retired, note: `Replaced by version ${row.version}` },
        transaction,
      );
    }
    await row.update({ status: 'approved', approvedById: actor.id, approvedAt: now }, { transaction });
    const [after] = await repo.toTargets([row], transaction);
    await recordAudit(
      actor,
      { action: 'approve', entity: TARGET, entityId: row.id, before, after, note: selfApproved ? SELF_APPROVAL_NOTE : null },
      transaction,
    );
    return after!;
  });
}

/** Levey–Jennings data: the targets that were ever in force, and every control result in run order. */
export async function chartData(materialId: number, assayCode: AssayCode): Promise<ControlChart> {
  await getMaterial(materialId);
  const [targets, history] = await Promise.all([repo.everApprovedTargets(materialId, assayCode), controlHistory(materialId, assayCode)]);
  return {
    controlMaterialId: materialId,
    assayCode,
    targets,
    points: history.map((h) => ({
      resultId: h.resultId,
      runId: h.runId,
      runNumber: h.runNumber,
      measuredAt: h.measuredAt.toISOString(),
      value: h.value,
      z: h.z,
      controlTargetId: h.controlTargetId,
      runStatus: h.runStatus,
      overridden: h.overridden,
    })),
  };
}
