import fs from 'node:fs';
import path from 'node:path';
import { commitFile, OperationRefused, removeDatabaseFiles, useRollbackJournal } from './backup';
import { openSqliteFile } from './sqlite-file';
import { verifyDatabaseFile, type VerifyReport } from './verify-database';

const IN_USE =
  'the database is open in another process (is the server running?); stop the server, then restore';

/**
 * Takes the database at `target` out of WAL mode, which SQLite allows only when no other connection has it open:
 * the test that no server is using it, and it leaves no -wal file behind to be replayed onto the restored copy.
 */
async function claimIdleDatabase(target: string): Promise<void> {
  const db = await openSqliteFile(target, { busyTimeoutMs: 0 });
  try {
    const [row] = await db.all<{ journal_mode: string }>('PRAGMA journal_mode = DELETE');
    if (row?.journal_mode !== 'delete') throw new OperationRefused(IN_USE);
  } catch (err) {
    if (err instanceof OperationRefused) throw err;
    if (/SQLITE_BUSY|SQLITE_LOCKED/.test((err as Error).message)) throw new OperationRefused(IN_USE);
    throw err;
  } finally {
    await db.close();
  }
}

export type RestoreResult = { report: VerifyReport; previousKeptAs: string | null };

/**
 * Replaces the database at `target` with the backup `candidate` after the same checks a backup passes. The
 * candidate is copied beside the target and checked there; a copy that fails is refused and the database is left
 * as it was. The replaced database is kept as `<target>.before-restore-<time>`; the swap itself is one rename.
 */
export async function restoreDatabase(candidate: string, target: string): Promise<RestoreResult> {
  if (!fs.existsSync(candidate)) throw new OperationRefused(`no backup file at ${candidate}`);
  if (path.resolve(candidate) === path.resolve(target)) throw new OperationRefused('the backup is the database itself');
  fs.mkdirSync(path.dirname(path.resolve(target)), { recursive: true });
  const temp = path.join(path.dirname(path.resolve(target)), `.${path.basename(target)}.restore-${process.pid}`);
  removeDatabaseFiles(temp);
  try {
    fs.copyFileSync(candidate, temp);
    const report = await verifyDatabaseFile(temp);
    report.file = candidate;
    if (report.problems.length) throw new OperationRefused('the backup failed its checks; the database was not changed', report);
    await useRollbackJournal(temp);

    let previousKeptAs: string | null = null;
    if (fs.existsSync(target)) {
      await claimIdleDatabase(target);
      previousKeptAs = `${target}.before-restore-${new Date().toISOString().replace(/[:.]/g, '-')}`;
      try {
        fs.linkSync(target, previousKeptAs);
      } catch {
        fs.copyFileSync(target, previousKeptAs); // a file system without hard links
      }
      for (const f of [`${target}-wal`, `${target}-shm`, `${target}-journal`]) fs.rmSync(f, { force: true });
    }
    commitFile(temp, target);
    return { report, previousKeptAs };
  } finally {
    removeDatabaseFiles(temp);
  }
}
