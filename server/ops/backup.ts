import fs from 'node:fs';
import path from 'node:path';
import { openSqliteFile } from './sqlite-file';
import { verifyDatabaseFile, type VerifyReport } from './verify-database';

/** The copy was not made or did not pass its checks; `report` says why when the checks ran. */
export class OperationRefused extends Error {
  constructor(
    message: string,
    readonly report: VerifyReport | null = null,
  ) {
    super(message);
    this.name = 'OperationRefused';
  }
}

export function removeDatabaseFiles(file: string): void {
  for (const f of [file, `${file}-wal`, `${file}-shm`, `${file}-journal`]) fs.rmSync(f, { force: true });
}

/** Makes a finished file durable under its final name: fsync, rename (atomic on one file system), fsync the folder. */
export function commitFile(temp: string, final: string): void {
  const fd = fs.openSync(temp, 'r+');
  fs.fsyncSync(fd);
  fs.closeSync(fd);
  fs.renameSync(temp, final);
  const dir = fs.openSync(path.dirname(path.resolve(final)), 'r');
  try {
    fs.fsyncSync(dir);
  } finally {
    fs.closeSync(dir);
  }
}

/** A self-contained single file: no -wal beside it to lose when the copy is moved. */
export async function useRollbackJournal(file: string): Promise<void> {
  const db = await openSqliteFile(file);
  try {
    await db.exec('PRAGMA journal_mode = DELETE');
  } finally {
    await db.close();
  }
}

/**
 * Takes an online copy of the database at `source` into `destination` with SQLite's backup API while the server
 * may be running (WAL: its writers go on; the copy is consistent as of one moment), verifies the copy, and only
 * then gives it its name. A copy that fails verification is deleted and refused.
 */
export async function backupDatabase(source: string, destination: string): Promise<VerifyReport> {
  if (!fs.existsSync(source)) throw new OperationRefused(`no database at ${source} (set DATABASE_PATH)`);
  if (fs.existsSync(destination)) throw new OperationRefused(`${destination} already exists; choose a new file name`);
  if (path.resolve(source) === path.resolve(destination)) throw new OperationRefused('the copy cannot replace the database itself');
  if (!fs.existsSync(path.dirname(path.resolve(destination)))) throw new OperationRefused(`the folder ${path.dirname(destination)} does not exist`);
  const temp = `${destination}.partial-${process.pid}`;
  removeDatabaseFiles(temp);
  try {
    const db = await openSqliteFile(source);
    try {
      await db.backupTo(temp);
    } finally {
      await db.close();
    }
    await useRollbackJournal(temp);
    const report = await verifyDatabaseFile(temp);
    report.file = destination;
    if (report.problems.length) throw new OperationRefused('the copy failed its checks and was deleted', report);
    commitFile(temp, destination);
    return report;
  } finally {
    removeDatabaseFiles(temp);
  }
}
