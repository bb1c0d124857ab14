import { Op, type Transaction } from 'sequelize';
import { plateMapWellsSchema, type PlateMapEntry } from '@/schemas/plate';
import type { StoredPlateMap } from '@/schemas/measurement';
import { UserModel } from '../users/user.model';
import { PlateMapModel } from './plate-map.model';

async function toStored(rows: PlateMapModel[], transaction?: Transaction): Promise<StoredPlateMap[]> {
  const ids = [...new Set(rows.map((r) => r.createdById).filter((i): i is number => i !== null))];
  const users = ids.length ? await UserModel.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'name'], transaction }) : [];
  const names = new Map(users.map((u) => [u.id, u.name]));
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    description: r.description,
    wells: plateMapWellsSchema.parse(JSON.parse(r.wells)),
    createdBy: r.createdById === null ? null : (names.get(r.createdById) ?? null),
    version: r.version,
    updatedAt: r.updatedAt.toISOString(),
  }));
}

export async function listPlateMaps(): Promise<StoredPlateMap[]> {
  return toStored(await PlateMapModel.findAll({ order: [['name', 'ASC']] }));
}

export async function findPlateMapById(id: number, transaction?: Transaction): Promise<StoredPlateMap | null> {
  const row = await PlateMapModel.findByPk(id, { transaction });
  return row ? (await toStored([row], transaction))[0]! : null;
}

export async function findPlateMapByName(name: string, transaction?: Transaction): Promise<StoredPlateMap | null> {
  const row = await PlateMapModel.findOne({ where: { name }, transaction });
  return row ? (await toStored([row], transaction))[0]! : null;
}

export async function insertPlateMap(
  data: { name: string; description: string; wells: PlateMapEntry[]; createdById: number | null },
  transaction: Transaction,
): Promise<StoredPlateMap> {
  const row = await PlateMapModel.create({ ...data, wells: JSON.stringify(data.wells) }, { transaction });
  return (await toStored([row], transaction))[0]!;
}

export async function updatePlateMapIfVersion(
  id: number,
  expectedVersion: number,
  changes: { name?: string; description?: string; wells?: PlateMapEntry[] },
  transaction: Transaction,
): Promise<boolean> {
  const { wells, ...rest } = changes;
  const [count] = await PlateMapModel.update(
    { ...rest, ...(wells ? { wells: JSON.stringify(wells) } : {}), version: expectedVersion + 1 },
    { where: { id, version: expectedVersion }, transaction },
  );
  return count === 1;
}

export async function deletePlateMapIfVersion(id: number, expectedVersion: number, transaction: Transaction): Promise<boolean> {
  return (await PlateMapModel.destroy({ where: { id, version: expectedVersion }, transaction })) === 1;
}
