import type { Sequelize, Transaction } from 'sequelize';
import type { ChangePlateMapInput, StoredPlateMap } from '@/schemas/measurement';
import type { CreatePlateMapInput } from '@/schemas/plate';
import type { User } from '@/schemas/user';
import { AppError, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { writeTransaction } from '../../db/write-transaction';
import * as repo from './plate-maps.repository';

export const listPlateMaps = repo.listPlateMaps;

export async function getPlateMap(id: number): Promise<StoredPlateMap> {
  const found = await repo.findPlateMapById(id);
  if (!found) throw notFound('Plate map', id);
  return found;
}

async function assertNameFree(name: string, exceptId: number | null, transaction: Transaction): Promise<void> {
  const other = await repo.findPlateMapByName(name, transaction);
  if (other && other.id !== exceptId) {
    const message = `A plate map named "${name}" already exists`;
    throw new AppError('CONFLICT', message, { fields: { name: message } });
  }
}

export async function createPlateMap(sequelize: Sequelize, actor: User, input: CreatePlateMapInput): Promise<StoredPlateMap> {
  return writeTransaction(sequelize, async (t) => {
    await assertNameFree(input.name, null, t);
    const created = await repo.insertPlateMap(
      { name: input.name, description: input.description ?? '', wells: input.wells, createdById: actor.id },
      t,
    );
    await recordAudit(actor, { action: 'create', entity: 'plate-map', entityId: created.id, after: created }, t);
    return created;
  });
}

export async function changePlateMap(sequelize: Sequelize, actor: User, id: number, input: ChangePlateMapInput): Promise<StoredPlateMap> {
  return writeTransaction(sequelize, async (t) => {
    const before = await repo.findPlateMapById(id, t);
    if (!before) throw notFound('Plate map', id);
    if (input.version !== before.version) throw staleVersion('plate map');
    const { version, ...changes } = input;
    if (changes.name !== undefined) await assertNameFree(changes.name, id, t);
    if (!(await repo.updatePlateMapIfVersion(id, version, changes, t))) throw staleVersion('plate map');
    const after = (await repo.findPlateMapById(id, t))!;
    await recordAudit(actor, { action: 'update', entity: 'plate-map', entityId: id, before, after }, t);
    return after;
  });
}

/** Removes a template; uploads already made with it keep their wells in each measurement. */
export async function deletePlateMap(sequelize: Sequelize, actor: User, id: number, version: number): Promise<void> {
  await writeTransaction(sequelize, async (t) => {
    const before = await repo.findPlateMapById(id, t);
    if (!before) throw notFound('Plate map', id);
    if (before.version !== version || !(await repo.deletePlateMapIfVersion(id, version, t))) throw staleVersion('plate map');
    await recordAudit(actor, { action: 'delete', entity: 'plate-map', entityId: id, before }, t);
  });
}
