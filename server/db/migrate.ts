import type { Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
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

/** Versioned migrations, applied in this order and recorded in the SequelizeMeta table. Never sync({alter}). */
const migrations = [m0001, m0002, m0003, m0004, m0005, m0006, m0008, m0009, m0010, m0011, m0012, m0013, m0015, m0016];

/** Names of the migrations this code knows (a restored database must not carry others). */
export const knownMigrationNames = (): string[] => migrations.map((m) => m.name);

export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: migrations.map((m) => ({ name: m.name, up: m.up, down: m.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize }),
    logger: undefined,
  });
}

export async function migrate(sequelize: Sequelize): Promise<string[]> {
  const done = await createMigrator(sequelize).up();
  return done.map((m) => m.name);
}
