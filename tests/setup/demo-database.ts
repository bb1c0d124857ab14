import type { Sequelize } from 'sequelize';
import type sqlite3 from 'sqlite3';
import { initModels } from '../../server/db/models';
import { migrate } from '../../server/db/migrate';
import { seedDemoIfEmpty } from '../../server/db/seed/demo';
import { ensureDefaultDefinitions } from '../../server/modules/assay-definitions/assay-definitions.service';

export const DEMO_PASSWORD = 'cristae-demo';

/**
 * Brings a database to the state every API test starts from: models bound to it, every migration, the default
 * assay definitions and the demo seed. On a copy of a template made by this same function each step finds
 * nothing left to do.
 */
export async function prepareDemoDatabase(sequelize: Sequelize): Promise<void> {
  initModels(sequelize);
  await migrate(sequelize);
  await ensureDefaultDefinitions(sequelize);
  await seedDemoIfEmpty(sequelize, DEMO_PASSWORD);
}

/** The name under which the "node" project's global set-up provides the seeded SQLite file (tests/setup/sqlite-template.ts). */
export const SQLITE_TEMPLATE_KEY = 'sqliteTemplate';

declare module 'vitest' {
  interface ProvidedContext {
    sqliteTemplate: string;
  }
}

// The backup handle is in sqlite3's JavaScript API but not in its type declarations (as in server/ops/sqlite-file.ts).
type BackupHandle = {
  step(pages: number, done: (err: Error | null) => void): void;
  finish(done?: (err: Error | null) => void): void;
  readonly completed: boolean;
};
type WithBackup = {
  backup(file: string, destName: string, sourceName: string, fileIsDestination: boolean, done: (err: Error | null) => void): BackupHandle;
};

/**
 * Copies every page of an in-memory SQLite database to `file` ('to-file'), or of `file` into it ('from-file'),
 * with SQLite's online backup API: schema, rows, indexes, triggers and AUTOINCREMENT counters alike.
 */
export async function copySqliteDatabase(sequelize: Sequelize, file: string, direction: 'to-file' | 'from-file'): Promise<void> {
  // An in-memory database has exactly one connection, shared by every query and transaction.
  const connection = (await sequelize.connectionManager.getConnection({ type: 'write' })) as unknown as sqlite3.Database & WithBackup;
  await new Promise<void>((resolve, reject) => {
    const backup = connection.backup(file, 'main', 'main', direction === 'to-file', (initErr) => {
      if (initErr) return reject(initErr);
      backup.step(-1, (stepErr) => {
        const failed = stepErr ?? (backup.completed ? null : new Error(`copying ${direction} ${file} did not complete`));
        backup.finish(() => (failed ? reject(failed) : resolve()));
      });
    });
  });
}
