import { createHash } from 'node:crypto';
import { knownMigrationNames } from '../db/migrate';
import { openSqliteFile, type SqliteFile } from './sqlite-file';

/**
 * Stored content kept with its SHA-256 beside it: a copy whose bytes no longer hash to the recorded value has
 * been damaged (the PDF a director signed must come back byte for byte).
 */
const HASHED_CONTENT = [
  { table: 'reports', content: 'pdf', hash: 'pdfSha256', label: 'report PDF' },
  { table: 'reports', content: 'document', hash: 'documentSha256', label: 'signed report document' },
  { table: 'uploads', content: 'content', hash: 'sha256', label: 'uploaded file' },
] as const;

export type VerifyReport = {
  file: string;
  /** What PRAGMA integrity_check answered (['ok'] for a sound file). */
  integrity: string[];
  foreignKeyViolations: number;
  tables: { name: string; rows: number }[];
  hashed: { label: string; checked: number; mismatched: number[] }[];
  /** One plain sentence per reason to refuse the copy; empty when it passed every check. */
  problems: string[];
};

const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;

async function columnsOf(db: SqliteFile, table: string): Promise<Set<string>> {
  const cols = await db.all<{ name: string }>(`PRAGMA table_info(${quoteIdent(table)})`);
  return new Set(cols.map((c) => c.name));
}

/**
 * Checks a Cristae database file without changing it: SQLite's integrity check and foreign keys, the row count of
 * every table, the SHA-256 of every stored PDF, signed document and upload against the value recorded beside it,
 * and that it is a Cristae database whose migrations this code knows.
 */
export async function verifyDatabaseFile(file: string): Promise<VerifyReport> {
  const report: VerifyReport = { file, integrity: [], foreignKeyViolations: 0, tables: [], hashed: [], problems: [] };
  let db: SqliteFile | null = null;
  try {
    db = await openSqliteFile(file);
    report.integrity = (await db.all<{ integrity_check: string }>('PRAGMA integrity_check')).map((r) => r.integrity_check);
    if (report.integrity.join() !== 'ok') {
      report.problems.push(`PRAGMA integrity_check found damage: ${report.integrity.slice(0, 5).join('; ')}`);
      return report;
    }
    report.foreignKeyViolations = (await db.all('PRAGMA foreign_key_check')).length;
    if (report.foreignKeyViolations) report.problems.push(`${report.foreignKeyViolations} rows point at rows that do not exist (PRAGMA foreign_key_check)`);

    const names = await db.all<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
    for (const { name } of names) {
      const [row] = await db.all<{ n: number }>(`SELECT COUNT(*) AS n FROM ${quoteIdent(name)}`);
      report.tables.push({ name, rows: row!.n });
    }
    const present = new Set(names.map((n) => n.name));
    const missing = ['SequelizeMeta', 'users', 'cases', 'reports'].filter((t) => !present.has(t));
    if (missing.length) {
      report.problems.push(`not a Cristae database: table${missing.length > 1 ? 's' : ''} ${missing.join(', ')} missing`);
      return report;
    }
    const known = new Set(knownMigrationNames());
    const unknown = (await db.all<{ name: string }>('SELECT name FROM "SequelizeMeta"')).map((m) => m.name).filter((n) => !known.has(n));
    if (unknown.length) report.problems.push(`made by a newer Cristae: migrations ${unknown.join(', ')} are unknown to this version`);

    for (const h of HASHED_CONTENT) {
      if (!present.has(h.table)) continue;
      const cols = await columnsOf(db, h.table);
      if (!cols.has(h.content) || !cols.has(h.hash)) continue;
      const result = { label: h.label, checked: 0, mismatched: [] as number[] };
      await db.each<{ id: number; content: Buffer | string | null; hash: string }>(
        `SELECT id, ${quoteIdent(h.content)} AS content, ${quoteIdent(h.hash)} AS hash FROM ${quoteIdent(h.table)} ORDER BY id`,
        (row) => {
          result.checked += 1;
          const actual = createHash('sha256').update(row.content ?? '').digest('hex');
          if (actual !== row.hash) result.mismatched.push(row.id);
        },
      );
      report.hashed.push(result);
      if (result.mismatched.length) {
        const ids = result.mismatched.slice(0, 10).join(', ');
        report.problems.push(`${result.mismatched.length} ${h.label}(s) no longer match their recorded SHA-256 (${h.table} id ${ids})`);
      }
    }
  } catch (err) {
    report.problems.push(`cannot be read as a SQLite database: ${(err as Error).message}`);
  } finally {
    await db?.close().catch(() => undefined);
  }
  return report;
}

/** The report as lines for a terminal: integrity, every table's row count, the hash checks, then any problems. */
export function describeReport(report: VerifyReport): string[] {
  const lines = [`file: ${report.file}`, `integrity_check: ${report.integrity.slice(0, 5).join('; ') || 'not run'}`];
  if (report.tables.length) {
    lines.push('rows per table:');
    const width = Math.max(...report.tables.map((t) => t.name.length));
    for (const t of report.tables) lines.push(`  ${t.name.padEnd(width)}  ${t.rows}`);
  }
  for (const h of report.hashed) {
    lines.push(`SHA-256 of ${h.label}s: ${h.checked - h.mismatched.length} of ${h.checked} match`);
  }
  for (const p of report.problems) lines.push(`PROBLEM: ${p}`);
  return lines;
}
