import { Op, type Transaction } from 'sequelize';
import {
  assayDefinitionSchema,
  storedDefinitionData,
  type AssayDefinition,
  type AssayDefinitionStatus,
  type StoredAssayDefinition,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { UserModel } from '../users/user.model';
import { AssayDefinitionModel } from './assay-definition.model';

type StoredData = Parameters<typeof storedDefinitionData>[0];

/** Names of the drafters and approvers of these rows, one query for the lot. */
async function namesOf(rows: AssayDefinitionModel[], transaction?: Transaction): Promise<Map<number, string>> {
  const ids = [...new Set(rows.flatMap((r) => [r.createdById, r.approvedById]).filter((id): id is number => id !== null))];
  if (ids.length === 0) return new Map();
  const users = await UserModel.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'name'], transaction });
  return new Map(users.map((u) => [u.id, u.name]));
}

function toStored(row: AssayDefinitionModel, names: Map<number, string>): StoredAssayDefinition {
  const name = (id: number | null) => (id === null ? null : (names.get(id) ?? null));
  return {
    id: row.id,
    definition: assayDefinitionSchema.parse(storedDefinitionData(JSON.parse(row.data) as StoredData)),
    status: row.status,
    changeNote: row.changeNote,
    createdBy: name(row.createdById),
    createdById: row.createdById,
    createdAt: row.createdAt.toISOString(),
    approvedBy: name(row.approvedById),
    approvedById: row.approvedById,
    approvedAt: row.approvedAt ? row.approvedAt.toISOString() : null,
    selfApproved: row.status === 'approved' && row.createdById !== null && row.createdById === row.approvedById,
  };
}

async function toStoredAll(rows: AssayDefinitionModel[], transaction?: Transaction): Promise<StoredAssayDefinition[]> {
  const names = await namesOf(rows, transaction);
  return rows.map((r) => toStored(r, names));
}

async function toStoredOne(row: AssayDefinitionModel | null, transaction?: Transaction): Promise<StoredAssayDefinition | null> {
  return row ? ((await toStoredAll([row], transaction))[0] ?? null) : null;
}

/** The version in force of every assay (its newest approved one). */
export async function listCurrentDefinitions(): Promise<StoredAssayDefinition[]> {
  const rows = await AssayDefinitionModel.findAll({ where: { status: 'approved' }, order: [['code', 'ASC'], ['version', 'DESC']] });
  const seen = new Set<string>();
  return toStoredAll(rows.filter((r) => (seen.has(r.code) ? false : (seen.add(r.code), true))));
}

/** Drafts awaiting a director's approval, of every assay. */
export async function listDraftDefinitions(): Promise<StoredAssayDefinition[]> {
  return toStoredAll(await AssayDefinitionModel.findAll({ where: { status: 'draft' }, order: [['code', 'ASC']] }));
}

/** The version calculations use: the newest approved one. */
export async function findCurrentDefinition(code: AssayCode, transaction?: Transaction): Promise<StoredAssayDefinition | null> {
  const row = await AssayDefinitionModel.findOne({ where: { code, status: 'approved' }, order: [['version', 'DESC']], transaction });
  return toStoredOne(row, transaction);
}

export async function findDraftDefinition(code: AssayCode, transaction?: Transaction): Promise<StoredAssayDefinition | null> {
  return toStoredOne(await AssayDefinitionModel.findOne({ where: { code, status: 'draft' }, transaction }), transaction);
}

export async function findDefinitionVersion(
  code: AssayCode,
  version: number,
  transaction?: Transaction,
): Promise<StoredAssayDefinition | null> {
  return toStoredOne(await AssayDefinitionModel.findOne({ where: { code, version }, transaction }), transaction);
}

export async function highestDefinitionVersion(code: AssayCode, transaction?: Transaction): Promise<number> {
  const max = await AssayDefinitionModel.max<number | null, AssayDefinitionModel>('version', { where: { code }, transaction });
  return typeof max === 'number' ? max : 0;
}

export async function findDefinitionById(id: number): Promise<StoredAssayDefinition | null> {
  return toStoredOne(await AssayDefinitionModel.findByPk(id));
}

export async function listDefinitionVersions(code: AssayCode): Promise<StoredAssayDefinition[]> {
  return toStoredAll(await AssayDefinitionModel.findAll({ where: { code }, order: [['version', 'DESC']] }));
}

export async function insertDefinitionVersion(
  definition: AssayDefinition,
  changeNote: string | null,
  createdById: number | null,
  status: 'draft' | 'approved',
  transaction?: Transaction,
): Promise<StoredAssayDefinition> {
  const row = await AssayDefinitionModel.create(
    {
      code: definition.code,
      version: definition.version,
      data: JSON.stringify(definition),
      changeNote,
      createdById,
      status,
      approvedById: null,
      approvedAt: status === 'approved' ? new Date() : null,
    },
    { transaction },
  );
  return (await toStoredOne(row, transaction))!;
}

/** Moves a draft on (approved or withdrawn); false when it is no longer a draft. */
export async function settleDraft(
  id: number,
  changes: { status: Exclude<AssayDefinitionStatus, 'draft'>; approvedById?: number; approvedAt?: Date },
  transaction: Transaction,
): Promise<boolean> {
  const [count] = await AssayDefinitionModel.update(changes, { where: { id, status: 'draft' }, transaction });
  return count === 1;
}

export async function countDefinitions(): Promise<number> {
  return AssayDefinitionModel.count();
}

/** The database the definitions live in (the key of the service's in-memory cache). */
export function databaseOfDefinitions(): object {
  return AssayDefinitionModel.sequelize!;
}
