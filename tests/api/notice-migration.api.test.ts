import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createMigrator } from '../../server/db/migrate';
import { openDatabase } from '../../server/db/sequelize';

/*
 * Migration 0009 replaces the after-the-fact delivery log (mail_deliveries) with the durable outbox
 * (notice_outbox). A log row written before the upgrade must survive it as a finished notice, and going back
 * down must return it to the old table. The rows are invented fixtures.
 */

let db: Sequelize;
const rows = async (sql: string) => (await db.query(sql))[0] as Record<string, unknown>[];

beforeAll(async () => {
  db = await openDatabase(':memory:');
  await createMigrator(db).up({ to: '0006-reports' });
  await db.query(
    `INSERT INTO mail_deliveries (kind, recipient, subject, status, error, "messageId", "attemptedAt") VALUES
     ('report_ready', 'old.sent@fixture.test', 'Report ready: accession FX-1', 'sent', NULL, '<a@fixture>', '2026-01-05 10:00:00.000 +00:00'),
     ('report_ready', 'old.failed@fixture.test', 'Report ready: accession FX-2', 'failed', 'connect ECONNREFUSED', NULL, '2026-01-06 11:00:00.000 +00:00')`,
  );
});
afterAll(() => db.close());

describe('migration 0009 (durable notices)', () => {
  it('when applied, then the old log rows become finished notices (one try, no text kept) and the old table is gone', async () => {
    await createMigrator(db).up();
    const moved = await rows('SELECT recipient, status, attempts, body, "lastError", "messageId", "sentAt", "createdAt" FROM notice_outbox ORDER BY id');
    expect(moved).toEqual([
      expect.objectContaining({ recipient: 'old.sent@fixture.test', status: 'sent', attempts: 1, body: null, messageId: '<a@fixture>', sentAt: '2026-01-05 10:00:00.000 +00:00' }),
      expect.objectContaining({ recipient: 'old.failed@fixture.test', status: 'failed', attempts: 1, body: null, lastError: 'connect ECONNREFUSED', sentAt: null }),
    ]);
    expect(await rows("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'mail_deliveries'")).toHaveLength(0);
  });

  it('when reverted, then finished notices return to the old log and the outbox table is dropped', async () => {
    await createMigrator(db).down({ to: '0009-durable-notices' });
    const back = await rows('SELECT recipient, status, error FROM mail_deliveries ORDER BY id');
    expect(back).toEqual([
      { recipient: 'old.sent@fixture.test', status: 'sent', error: null },
      { recipient: 'old.failed@fixture.test', status: 'failed', error: 'connect ECONNREFUSED' },
    ]);
    expect(await rows("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'notice_outbox'")).toHaveLength(0);
  });
});
