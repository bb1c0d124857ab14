import { initModels } from '../../server/db/models';
import { migrate } from '../../server/db/migrate';
import { seedDemoIfEmpty } from '../../server/db/seed/demo';
import { openDatabase } from '../../server/db/sequelize';
import { ensureDefaultDefinitions } from '../../server/modules/assay-definitions/assay-definitions.service';
import { createPostgresDatabase, TEMPLATE_DATABASE } from './test-database';
import { DEMO_PASSWORD } from './test-app';

/**
 * Global set-up of the "api-pg" project: one database migrated and seeded exactly as makeTestApp() would, which
 * every test file's database is then copied from (CREATE DATABASE … TEMPLATE), instead of migrating and seeding
 * its own. makeTestApp() still runs the migrations and the seed on the copy: they find nothing to do.
 */
export default async function setup(): Promise<() => Promise<void>> {
  const template = await createPostgresDatabase(TEMPLATE_DATABASE);
  const sequelize = await openDatabase(template.url);
  initModels(sequelize);
  await migrate(sequelize);
  await ensureDefaultDefinitions(sequelize);
  await seedDemoIfEmpty(sequelize, DEMO_PASSWORD);
  await sequelize.close();
  return template.drop;
}
