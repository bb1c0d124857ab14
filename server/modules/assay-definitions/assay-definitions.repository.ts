import { Op, type Transaction } from 'sequelize';
import {
  assayDefinitionSchema,
  storedDefinitionData,
  type AssayDefinition,
  type StoredAssayDefinition,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { UserModel } from '../users/user.model';
import { AssayDefinitionModel } from './assay-definition.model';

type StoredData = Parameters<typeof storedDefinitionData>[0];

async function toStored(row: AssayDefinitionModel, names?: Map<number, string>): Promise<StoredAssayDefinition> {
  let createdBy: string | null = null;
  if (row.createdById != null) {
    createdBy = names?.get(row.createdById) ?? (await UserModel.findByPk(row.createdById))?.name ?? null;
  }
  return {
    id: row.id,
    definition: assayDefinitionSchema.parse(storedDefinitionData(JSON.parse(row.data) as StoredData)),
    changeNote: row.changeNote,
    createdBy,
    createdAt: row.createdAt.toISOString(),
  };
}

/** The newest version of every assay. */
export async function listCurrentDefinitions(): Promise<StoredAssayDefinition[]> {
  const rows = await AssayDefinitionModel.findAll({ order: [['code', 'ASC'], ['version', 'DESC']] });
  const seen = new Set<string>();
  const current = rows.filter((r) => (seen.has(r.code) ? false : (seen.add(r.code), true)));
  const users = await UserModel.findAll({ where: { id: { [Op.in]: current.map((r) => r.createdById ?? -1) } } });
  const names = new Map(users.map((u) => [u.id, u.name]));
  return Promise.all(current.map((r) => toStored(r, names)));
}

export async function findCurrentDefinition(code: AssayCode, transaction?: Transaction): Promise<StoredAssayDefinition | null> {
  const row = await AssayDefinitionModel.findOne({ where: { code }, order: [['version', 'DESC']], transaction });
  return row ? toStored(row) : null;
}

export async function findDefinitionById(id: number): Promise<StoredAssayDefinition | null> {
  const row = await AssayDefinitionModel.findByPk(id);
  return row ? toStored(row) : null;
}

export async function listDefinitionVersions(code: AssayCode): Promise<StoredAssayDefinition[]> {
  const rows = await AssayDefinitionModel.findAll({ where: { code }, order: [['version', 'DESC']] });
  return Promise.all(rows.map((r) => toStored(r)));
}

export async function insertDefinitionVersion(
  definition: AssayDefinition,
  changeNote: string | null,
  createdById: number | null,
  transaction?: Transaction,
): Promise<StoredAssayDefinition> {
  const row = await AssayDefinitionModel.create(
    { code: definition.code, version: definition.version, data: JSON.stringify(definition), changeNote, createdById },
    { transaction },
  );
  return toStored(row);
}

export async function countDefinitions(): Promise<number> {
  return AssayDefinitionModel.count();
}

/** The database the definitions live in (the key of the service's in-memory cache). */
export function databaseOfDefinitions(): object {
  return AssayDefinitionModel.sequelize!;
}
