import type { Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import * as m0001 from './migrations/0001-foundation';
import * as m0002 from './migrations/0002-registry';

/** Versioned migrations, applied in this order and recorded in the SequelizeMeta table. Never sync({alter}). */
const migrations = [m0001, m0002];

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
