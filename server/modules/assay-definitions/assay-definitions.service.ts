import type { Sequelize, Transaction } from 'sequelize';
import {
  assayDefinitionSchema,
  defaultAssayDefinitions,
  type CalculationRequest,
  type CalculationResult,
  type CreateAssayDefinitionVersionInput,
  type StoredAssayDefinition,
  type WithdrawAssayDefinitionInput,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { User } from '@/schemas/user';
import { calculateActivity } from '../../domain/assay-engine/engine';
import { badInput, conflict, invalidState, notFound, staleVersion, zodFields } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { checkApprover, SELF_APPROVAL_NOTE } from '../lab-profile/lab-profile.service';
import { requireFinite } from '../measurements/compute';
import * as repo from './assay-definitions.repository';
import { writeTransaction } from '../../db/write-transaction';

export async function listCurrentDefinitions(): Promise<{ items: StoredAssayDefinition[]; drafts: StoredAssayDefinition[] }> {
  const [items, drafts] = await Promise.all([repo.listCurrentDefinitions(), repo.listDraftDefinitions()]);
  return { items, drafts };
}
export const listDefinitionVersions = repo.listDefinitionVersions;
export const findDefinitionById = repo.findDefinitionById;

// Definitions change rarely and are read on every calculation: the current ones are kept in memory, per
// database, and forgotten whenever a version is written (after its transaction ends, committed or not).
const currentCache = new WeakMap<object, Map<AssayCode, StoredAssayDefinition>>();

function cacheFor(sequelize: object): Map<AssayCode, StoredAssayDefinition> {
  let cache = currentCache.get(sequelize);
  if (!cache) currentCache.set(sequelize, (cache = new Map()));
  return cache;
}

/** The definition in force for an assay; the published defaults are stored at start-up, so one always exists. */
export async function getCurrentDefinition(code: AssayCode): Promise<StoredAssayDefinition> {
  const cache = cacheFor(repo.databaseOfDefinitions());
  const cached = cache.get(code);
  if (cached) return cached;
  const found = await repo.findCurrentDefinition(code);
  if (!found) throw notFound('Assay definition', code);
  cache.set(code, found);
  return found;
}

/** Stores the published defaults as version 1 of each assay, once, on an empty table. */
export async function ensureDefaultDefinitions(sequelize: Sequelize): Promise<void> {
  if ((await repo.countDefinitions()) > 0) return;
  await writeTransaction(sequelize, async (transaction) => {
    for (const d of defaultAssayDefinitions) {
      await repo.insertDefinitionVersion(d, 'Published defaults (docs/domain.md §1)', null, 'approved', transaction);
    }
  });
  currentCache.delete(sequelize);
}

/**
 * A director's change becomes a new version, saved as a draft: calculations keep using the approved version
 * until another director approves it (approveDefinitionVersion). One draft per assay at a time, based on the
 * version in force. Stored results keep the version they were computed with, so nothing already measured changes.
 */
export async function createDefinitionVersion(
  sequelize: Sequelize,
  actor: User,
  code: AssayCode,
  input: CreateAssayDefinitionVersionInput,
): Promise<StoredAssayDefinition> {
  try {
    return await writeTransaction(sequelize, async (transaction) => {
      const current = await repo.findCurrentDefinition(code, transaction);
      if (!current) throw notFound('Assay definition', code);
      if (current.definition.version !== input.basedOnVersion) throw staleVersion('assay definition');
      const pending = await repo.findDraftDefinition(code, transaction);
      if (pending) {
        throw conflict(
          `Version ${pending.definition.version} of ${code}, drafted by ${pending.createdBy ?? 'a director'}, is awaiting a second director. ` +
            'Approve or withdraw it before drafting another.',
        );
      }
      const version = (await repo.highestDefinitionVersion(code, transaction)) + 1;
      const parsed = assayDefinitionSchema.safeParse({ ...input.definition, code, version });
      // Cross-field rules (linear range order, first-order only for CIV) name the field as the form shows it.
      if (!parsed.success) throw badInput(zodFields(parsed.error, 'definition'));
      const next = parsed.data;
      const stored = await repo.insertDefinitionVersion(next, input.changeNote, actor.id, 'draft', transaction);
      await recordAudit(
        actor,
        {
          action: 'draft-version',
          entity: 'assay-definition',
          entityId: `${code} v${next.version}`,
          before: current.definition,
          after: next,
          note: input.changeNote,
        },
        transaction,
      );
      return stored;
    });
  } finally {
    currentCache.delete(sequelize);
  }
}

async function draftOf(code: AssayCode, version: number, transaction: Transaction): Promise<StoredAssayDefinition> {
  const found = await repo.findDefinitionVersion(code, version, transaction);
  if (!found) throw notFound('Assay definition', `${code} v${version}`);
  if (found.status !== 'draft') {
    throw invalidState(`Version ${version} of ${code} is ${found.status}; only a draft can be approved or withdrawn`);
  }
  return found;
}

/**
 * Puts a draft in force. Separation of duties: the approver is a director other than the drafter, unless the
 * laboratory profile allows self-approval (then the audit and the reports that use the version say so).
 */
export async function approveDefinitionVersion(
  sequelize: Sequelize,
  actor: User,
  code: AssayCode,
  version: number,
  now: Date = new Date(),
): Promise<StoredAssayDefinition> {
  try {
    return await writeTransaction(sequelize, async (transaction) => {
      const draft = await draftOf(code, version, transaction);
      const { selfApproved } = await checkApprover(actor, draft.createdById, `version ${version} of ${code}`, transaction);
      if (!(await repo.settleDraft(draft.id, { status: 'approved', approvedById: actor.id, approvedAt: now }, transaction))) {
        throw staleVersion('assay definition');
      }
      const after = (await repo.findDefinitionVersion(code, version, transaction))!;
      await recordAudit(
        actor,
        {
          action: 'approve',
          entity: 'assay-definition',
          entityId: `${code} v${version}`,
          before: { status: draft.status },
          after: { status: after.status, approvedById: after.approvedById, approvedAt: after.approvedAt },
          note: selfApproved ? SELF_APPROVAL_NOTE : null,
        },
        transaction,
      );
      return after;
    });
  } finally {
    currentCache.delete(sequelize);
  }
}

/** Drops a draft with a reason; it stays listed among the versions, never used. */
export async function withdrawDefinitionVersion(
  sequelize: Sequelize,
  actor: User,
  code: AssayCode,
  version: number,
  input: WithdrawAssayDefinitionInput,
): Promise<StoredAssayDefinition> {
  return writeTransaction(sequelize, async (transaction) => {
    const draft = await draftOf(code, version, transaction);
    if (!(await repo.settleDraft(draft.id, { status: 'withdrawn' }, transaction))) throw staleVersion('assay definition');
    await recordAudit(
      actor,
      {
        action: 'withdraw',
        entity: 'assay-definition',
        entityId: `${code} v${version}`,
        before: { status: draft.status },
        after: { status: 'withdrawn' },
        note: input.reason,
      },
      transaction,
    );
    return (await repo.findDefinitionVersion(code, version, transaction))!;
  });
}

/** One measurement through the engine with the assay's current definition; nothing is stored. */
export async function previewActivity(request: CalculationRequest): Promise<CalculationResult & { definitionId: number }> {
  const current = await getCurrentDefinition(request.assay);
  // The preview contract is the linear model; a first-order definition still answers its linear rate.
  const definition = { ...current.definition, rateModel: 'linear' as const };
  return { ...requireFinite(calculateActivity(request, definition)), definitionId: current.id };
}
