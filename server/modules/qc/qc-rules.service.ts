import type { Sequelize, Transaction } from 'sequelize';
import { westgardRules, type PutQcRulesBody, type QcRuleSelection, type WestgardRuleName } from '@/schemas/qc';
import type { User } from '@/schemas/user';
import { writeTransaction } from '../../db/write-transaction';
import { notFound } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { LabProfileModel } from '../lab-profile/lab-profile.model';

const PROFILE_ID = 1;

/** Stored JSON → the rules in their canonical order; null or unreadable means every rule. */
function parseRules(stored: string | null | undefined): WestgardRuleName[] {
  if (!stored) return [...westgardRules];
  const chosen = new Set(JSON.parse(stored) as string[]);
  return westgardRules.filter((r) => chosen.has(r));
}

/** The Westgard rules the laboratory switches on (every rule until a director chooses). */
export async function getLabQcRules(transaction?: Transaction): Promise<QcRuleSelection> {
  const row = await LabProfileModel.findByPk(PROFILE_ID, { attributes: ['id', 'qcRules'], transaction });
  return { rules: parseRules(row?.qcRules) };
}

/** A director's choice of rules, audited with the selection before and after. */
export async function saveLabQcRules(sequelize: Sequelize, actor: User, body: PutQcRulesBody): Promise<QcRuleSelection> {
  return writeTransaction(sequelize, async (transaction) => {
    const row = await LabProfileModel.findByPk(PROFILE_ID, { transaction });
    if (!row) throw notFound('Laboratory profile');
    const before = { rules: parseRules(row.qcRules) };
    const after = { rules: westgardRules.filter((r) => body.rules.includes(r)) };
    await LabProfileModel.update({ qcRules: JSON.stringify(after.rules) }, { where: { id: PROFILE_ID }, transaction });
    await recordAudit(actor, { action: 'update', entity: 'qc-rules', entityId: PROFILE_ID, before, after }, transaction);
    return after;
  });
}
