import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes, type Sequelize } from 'sequelize';
import { createMigrator, knownMigrationNames } from '../../server/db/migrate';
import { openTestDatabase, testDialect, type TestDatabase } from '../setup/test-database';

/*
 * Every migration, up and down and up again, on the database under test (SQLite in project "node", PostgreSQL
 * in "api-pg"): the same list runs on both, and what a migration builds in a dialect's own terms (triggers, the
 * search index, the pattern table) works on each. Invented rows.
 */
let db: TestDatabase;
let sequelize: Sequelize;
beforeAll(async () => {
  db = await openTestDatabase();
  sequelize = db.sequelize;
});
afterAll(() => db.drop());

const tables = async () =>
  (await sequelize.getQueryInterface().showAllTables()).map((t) => (typeof t === 'string' ? t : (t as { tableName: string }).tableName));
const refusal = async (sql: string) => {
  try {
    await sequelize.query(sql);
    return 'no error';
  } catch (err) {
    return ((err as { parent?: Error }).parent ?? (err as Error)).message;
  }
};

async function insertAuditEvent(): Promise<void> {
  await sequelize.query(
    `INSERT INTO audit_events ("at", action, entity, "entityId") VALUES (:at, 'create', 'fixture', 'mig-1')`,
    { replacements: { at: new Date('2026-03-01T10:00:00Z') } },
  );
}

async function expectMigratedBehaviour(): Promise<void> {
  // Audit events are append-only at the storage level (migration 0001, a trigger in each dialect).
  await insertAuditEvent();
  expect(await refusal(`UPDATE audit_events SET action = 'forged'`)).toMatch(/append-only/);
  expect(await refusal(`DELETE FROM audit_events`)).toMatch(/append-only/);
  // The pattern code is split into findings by a trigger (migration 0003).
  const now = new Date();
  await sequelize.query(
    `INSERT INTO users (email, name, role, "passwordHash", "createdAt", "updatedAt") VALUES ('m@fixture.test', 'M', 'clinician', 'x', :now, :now)`,
    { replacements: { now } },
  );
  await sequelize.query(
    `INSERT INTO patients ("labPatientId", "familyName", "givenName", "dateOfBirth", sex, "nameKey", "createdAt", "updatedAt")
     VALUES ('MIG-1', 'Fixture', 'Mig', '2015-01-01', 'female', 'fixture mig', :now, :now)`,
    { replacements: { now } },
  );
  const idOf = async (sql: string) => ((await sequelize.query(sql, { type: QueryTypes.SELECT })) as { id: number }[])[0]!.id;
  const user = { id: await idOf(`SELECT id FROM users WHERE email = 'm@fixture.test'`) };
  const patient = { id: await idOf(`SELECT id FROM patients WHERE "labPatientId" = 'MIG-1'`) };
  await sequelize.query(
    `INSERT INTO cases (accession, "patientId", "referringClinicianId", "clinicalIndication", priority, state, "searchText", "patientName", "patternCode", "createdAt", "updatedAt")
     VALUES ('FX-MIG-0001', :patient, :user, 'fixture', 'routine', 'received', 'fx-mig-0001 fixture mig', 'Fixture, Mig', 'isolated:CI+raised_cs; normal', :now, :now)`,
    { replacements: { patient: patient.id, user: user.id, now } },
  );
  const [found] = await sequelize.query('SELECT item, kind FROM case_patterns ORDER BY item');
  expect(found).toEqual([
    { item: 'isolated:CI', kind: 'isolated' },
    { item: 'normal', kind: 'normal' },
    { item: 'raised_cs', kind: 'raised_cs' },
  ]);
}

describe(`every migration on ${testDialect}`, () => {
  it('when applied to an empty database, reverted to nothing and applied again, then each time all are recorded and only the log is left in between', async () => {
    expect((await createMigrator(sequelize).up()).map((m) => m.name)).toEqual(knownMigrationNames());
    expect(await tables()).toEqual(expect.arrayContaining(['users', 'cases', 'audit_events', 'reports', 'case_patterns']));
    await createMigrator(sequelize).down({ to: 0 });
    expect((await tables()).filter((t) => !/^sqlite_|^SequelizeMeta$/.test(t))).toEqual([]);
    expect((await createMigrator(sequelize).up()).map((m) => m.name)).toEqual(knownMigrationNames());
  });

  it('when migrated, then audit events cannot be changed or deleted and a pattern code is split into its findings', async () => {
    await expectMigratedBehaviour();
  });
});
