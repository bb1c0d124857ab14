import { openDatabase } from '../../server/db/sequelize';
import { prepareDemoDatabase } from './demo-database';
import { createPostgresDatabase, TEMPLATE_DATABASE } from './test-database';

/**
 * Global set-up of the "api-pg" project: one database migrated and seeded exactly as makeTestApp() would, which
 * every test file's database is then copied from (CREATE DATABASE … TEMPLATE), instead of migrating and seeding
 * its own. makeTestApp() still runs the migrations and the seed on the copy: they find nothing to do.
 */
export default async function setup(): Promise<() => Promise<void>> {
  const template = await createPostgresDatabase(TEMPLATE_DATABASE);
  const sequelize = await openDatabase(template.url);
  await prepareDemoDatabase(sequelize);
  await sequelize.close();
  return template.drop;
}
