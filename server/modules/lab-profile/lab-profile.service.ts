import type { Sequelize } from 'sequelize';
import type { LabProfile, UpdateLabProfileInput } from '@/schemas/lab-profile';
import type { User } from '@/schemas/user';
import { notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { LabProfileModel } from './lab-profile.model';
import { writeTransaction } from '../../db/write-transaction';

const PROFILE_ID = 1;

function toProfile(row: LabProfileModel): LabProfile {
  return {
    name: row.name,
    addressLines: JSON.parse(row.addressLines) as string[],
    accreditationNumber: row.accreditationNumber,
    phone: row.phone,
    timeZone: row.timeZone,
    version: row.version,
  };
}

export async function getLabProfile(): Promise<LabProfile> {
  const row = await LabProfileModel.findByPk(PROFILE_ID);
  if (!row) throw notFound('Laboratory profile');
  return toProfile(row);
}

export async function saveLabProfile(
  sequelize: Sequelize,
  actor: User | null,
  input: UpdateLabProfileInput,
): Promise<LabProfile> {
  return writeTransaction(sequelize, async (transaction) => {
    const row = await LabProfileModel.findByPk(PROFILE_ID, { transaction });
    const values = {
      name: input.name,
      addressLines: JSON.stringify(input.addressLines.filter((l) => l.length > 0)),
      accreditationNumber: input.accreditationNumber,
      phone: input.phone,
      timeZone: input.timeZone,
    };
    if (!row) {
      const created = await LabProfileModel.create({ id: PROFILE_ID, ...values }, { transaction });
      await recordAudit(actor, { action: 'create', entity: 'lab-profile', entityId: PROFILE_ID, after: toProfile(created) }, transaction);
      return toProfile(created);
    }
    const before = toProfile(row);
    const [count] = await LabProfileModel.update(
      { ...values, version: input.version + 1 },
      { where: { id: PROFILE_ID, version: input.version }, transaction },
    );
    if (count !== 1) throw staleVersion('laboratory profile');
    const after = toProfile((await LabProfileModel.findByPk(PROFILE_ID, { transaction }))!);
    await recordAudit(actor, { action: 'update', entity: 'lab-profile', entityId: PROFILE_ID, before, after }, transaction);
    return after;
  });
}
