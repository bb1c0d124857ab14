import type { Sequelize } from 'sequelize';
import {
  assayDefinitionSchema,
  defaultAssayDefinitions,
  type CalculationRequest,
  type CalculationResult,
  type CreateAssayDefinitionVersionInput,
  type StoredAssayDefinition,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { User } from '@/schemas/user';
import { calculateActivity } from '../../domain/assay-engine/engine';
import { badInput, notFound, staleVersion, zodFields } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { requireFinite } from '../measurements/compute';
import * as repo from './assay-definitions.repository';
import { writeTransaction } from '../../db/write-transaction';

export const listCurrentDefinitions = repo.listCurrentDefinitions;
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
      await repo.insertDefinitionVersion(d, 'Published defaults (docs/domain.md §1)', null, transaction);
    }
  });
  currentCache.delete(sequelize);
}

/**
 * A director's change becomes a new version; stored results keep the version they were computed with,
 * so nothing already measured changes.
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
      const parsed = assayDefinitionSchema.safeParse({ ...input.definition, code, version: current.definition.version + 1 });
      // Cross-field rules (linear range order, first-order only for CIV) name the field as the form shows it.
      if (!parsed.success) throw badInput(zodFields(parsed.error, 'definition'));
      const next = parsed.data;
      const stored = await repo.insertDefinitionVersion(next, input.changeNote, actor.id, transaction);
      await recordAudit(
        actor,
        {
          action: 'new-version',
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

/** One measurement through the engine with the assay's current definition; nothing is stored. */
export async function previewActivity(request: CalculationRequest): Promise<CalculationResult & { definitionId: number }> {
  const current = await getCurrentDefinition(request.assay);
  // The preview contract is the linear model; a first-order definition still answers its linear rate.
  const definition = { ...current.definition, rateModel: 'linear' as const };
  return { ...requireFinite(calculateActivity(request, definition)), definitionId: current.id };
}
