import type { Sequelize, Transaction } from 'sequelize';
import { isIanaTimeZone } from '@/schemas/common';
import type { LabProfile, UpdateLabProfileInput } from '@/schemas/lab-profile';
import type { User } from '@/schemas/user';
import { AppError, notFound, staleVersion } from '../../lib/errors';
import { logWarn } from '../../lib/log';
import { recordAudit } from '../audit/audit.service';
import { LabProfileModel } from './lab-profile.model';
import { writeTransaction } from '../../db/write-transaction';

const PROFILE_ID = 1;
/** Used when the stored zone is not a real one, so that no screen or signature fails on it. */
export const FALLBACK_TIME_ZONE = 'UTC';

/** Bad zones already reported in the log, so a stored mistake is logged once per process, not per request. */
const reportedBadZones = new Set<string>();

/**
 * The zone to work in: the stored one when the runtime knows it, otherwise UTC with a notice (and one logged
 * warning). A zone written before validation existed, or straight into the database, cannot then take case
 * lists, registration or signing down.
 */
function effectiveTimeZone(stored: string): { timeZone: string; timeZoneNotice: string | null } {
  if (isIanaTimeZone(stored)) return { timeZone: stored, timeZoneNotice: null };
  if (!reportedBadZones.has(stored)) {
    reportedBadZones.add(stored);
    logWarn('The laboratory time zone is not a known IANA zone; using UTC', { stored, fallback: FALLBACK_TIME_ZONE });
  }
  return {
    timeZone: FALLBACK_TIME_ZONE,
    timeZoneNotice:
      `The saved time zone "${stored}" is not a known IANA zone, so Cristae reads and prints times in UTC. ` +
      'An administrator should enter the right zone (e.g. Europe/London) and save the profile.',
  };
}

function toProfile(row: LabProfileModel): LabProfile {
  return {
    name: row.name,
    addressLines: JSON.parse(row.addressLines) as string[],
    accreditationNumber: row.accreditationNumber,
    phone: row.phone,
    ...effectiveTimeZone(row.timeZone),
    allowSelfApproval: Boolean(row.allowSelfApproval),
    version: row.version,
  };
}

export async function getLabProfile(): Promise<LabProfile> {
  const row = await LabProfileModel.findByPk(PROFILE_ID);
  if (!row) throw notFound('Laboratory profile');
  return toProfile(row);
}

/** The audit note of an approval by the director who drafted the version. */
export const SELF_APPROVAL_NOTE = 'Self-approved: the laboratory profile allows a single director to approve their own drafts';

/**
 * Separation of duties: a version is approved by a director other than the one who drafted it. The drafter may
 * approve it only when the laboratory profile allows self-approval (a laboratory with a single director); the
 * answer says whether this approval is such a one, for the audit note.
 */
export async function checkApprover(
  actor: User,
  drafterId: number | null,
  what: string,
  transaction?: Transaction,
): Promise<{ selfApproved: boolean }> {
  if (drafterId === null || drafterId !== actor.id) return { selfApproved: false };
  const row = await LabProfileModel.findByPk(PROFILE_ID, { transaction });
  if (row?.allowSelfApproval) return { selfApproved: true };
  throw new AppError(
    'SECOND_DIRECTOR_REQUIRED',
    `You drafted ${what}, so another director must approve it. ` +
      'A laboratory with a single director can allow self-approval in the laboratory profile.',
  );
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
      ...(input.allowSelfApproval === undefined ? {} : { allowSelfApproval: input.allowSelfApproval }),
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
