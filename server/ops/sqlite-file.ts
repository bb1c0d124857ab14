import sqlite3 from 'sqlite3';

/**
 * A plain sqlite3 connection with promises, for work on whole database files (backup, verify, restore) that
 * goes below Sequelize: the backup API and pragmas on a file that is not the application's database.
 */
export type SqliteFile = {
  all<T>(sql: string, params?: unknown[]): Promise<T[]>;
  /** Visits rows one at a time, so large blobs are not all held in memory. */
  each<T>(sql: string, visit: (row: T) => void): Promise<void>;
  exec(sql: string): Promise<void>;
  /** SQLite's online backup API: copies every page into `destination`, consistent as of one read transaction. */
  backupTo(destination: string): Promise<void>;
  close(): Promise<void>;
};

// The backup handle is in sqlite3's JavaScript API but not in its type declarations.
type BackupHandle = {
  step(pages: number, done: (err: Error | null) => void): void;
  finish(done?: (err: Error | null) => void): void;
  readonly completed: boolean;
  readonly failed: boolean;
};

export function openSqliteFile(file: string, opts: { readOnly?: boolean; busyTimeoutMs?: number } = {}): Promise<SqliteFile> {
  const mode = opts.readOnly ? sqlite3.OPEN_READONLY : sqlite3.OPEN_READWRITE;
  return new Promise((resolve, reject) => {
    const db: sqlite3.Database = new sqlite3.Database(file, mode, (openErr) => {
      if (openErr) return reject(openErr);
      db.configure('busyTimeout', opts.busyTimeoutMs ?? 5000);
      resolve({
        all: <T>(sql: string, params: unknown[] = []) =>
          new Promise<T[]>((res, rej) => db.all(sql, params, (err, rows) => (err ? rej(err) : res(rows as T[])))),
        each: <T>(sql: string, visit: (row: T) => void) =>
          new Promise<void>((res, rej) => {
            let failure: Error | null = null;
            db.each(
              sql,
              (err, row) => {
                if (err) failure = err;
                else if (!failure) {
                  try {
                    visit(row as T);
                  } catch (e) {
                    failure = e as Error;
                  }
                }
              },
              (err) => (err || failure ? rej(err ?? failure) : res()),
            );
          }),
        exec: (sql: string) => new Promise<void>((res, rej) => db.exec(sql, (err) => (err ? rej(err) : res()))),
        backupTo: (destination: string) =>
          new Promise<void>((res, rej) => {
            const backup = (db as unknown as { backup: (f: string, cb: (err: Error | null) => void) => BackupHandle }).backup(
              destination,
              (initErr) => {
                if (initErr) return rej(initErr);
                // -1: every page in one step, under one read transaction; writers carry on meanwhile (WAL).
                backup.step(-1, (stepErr) => {
                  const failed = stepErr ?? (backup.completed ? null : new Error('the backup did not complete'));
                  backup.finish(() => (failed ? rej(failed) : res()));
                });
              },
            );
          }),
        close: () => new Promise<void>((res, rej) => db.close((err) => (err ? rej(err) : res()))),
      });
    });
  });
}
