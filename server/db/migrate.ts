import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrateDownOptions, MigrateUpOptions } from 'umzug';
import * as m0001 from './migrations/0001-foundation';
import * as m0002 from './migrations/0002-registry';
import * as m0003 from './migrations/0003-registry-indexes';
import * as m0004 from './migrations/0004-reference-intervals';
import * as m0005 from './migrations/0005-plate-map-description';
import * as m0006 from './migrations/0006-reports';
import * as m0008 from './migrations/0008-account-security';
import * as m0009 from './migrations/0009-durable-notices';
import * as m0010 from './migrations/0010-case-amendment';
import * as m0011 from './migrations/0011-measurement-exclusion';
import * as m0012 from './migrations/0012-approvals';
import * as m0013 from './migrations/0013-analytical-runs';
import * as m0015 from './migrations/0015-qc-rules';
import * as m0016 from './migrations/0016-cohorts';
import * as m0017 from './migrations/0017-cohort-measure-columns';
import * as m0018 from './migrations/0018-cohort-plot-cells';

/** Versioned migrations, applied in this order and recorded in the SequelizeMeta table. Never sync({alter}). */
const migrations = [m0001, m0002, m0003, m0004, m0005, m0006, m0008, m0009, m0010, m0011, m0012, m0013, m0015, m0016, m0017, m0018];

/** Names of the migrations this code knows (a restored database must not carry others). */
export const knownMigrationNames = (): string[] => migrations.map((m) => m.name);

/**
 * Umzug over the list above. Umzug (with its command-line parser) is loaded on the first `up` or `down`, so a
 * start on a database that is already current does not load it.
 */
export function createMigrator(sequelize: Sequelize) {
  const umzug = async () => {
    const { SequelizeStorage, Umzug } = await import('umzug');
    return new Umzug({
      migrations: migrations.map((m) => ({ name: m.name, up: m.up, down: m.down })),
      context: sequelize.getQueryInterface(),
      storage: new SequelizeStorage({ sequelize }),
      logger: undefined,
    });
  };
  return {
    up: async (options?: MigrateUpOptions) => (await umzug()).up(options),
    down: async (options?: MigrateDownOptions) => (await umzug()).down(options),
  };
}

/** Whether SequelizeMeta already records every known migration (false when the table is missing). */
async function schemaIsCurrent(sequelize: Sequelize): Promise<boolean> {
  try {
    const rows = await sequelize.query<{ name: string }>('SELECT "name" FROM "SequelizeMeta"', { type: QueryTypes.SELECT });
    const applied = new Set(rows.map((r) => r.name));
    return migrations.every((m) => applied.has(m.name));
  } catch {
    return false;
  }
}

export async function migrate(sequelize: Sequelize): Promise<string[]> {
  if (await schemaIsCurrent(sequelize)) return [];
  const done = await createMigrator(sequelize).up();
  return done.map((m) => m.name);
}
