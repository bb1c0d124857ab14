import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSqliteFile } from '../../server/ops/sqlite-file';
import { buildPatientInput } from '../factories/cases';
import { runTs, startServerProcess, tempDataDir, type ServerProcess } from '../setup/server-process';
import { DEMO_PASSWORD } from '../setup/test-app';

// End to end, as an operator would: the real server with the invented demo laboratory (signed reports with
// PDFs, uploaded plate files), `npm run backup` while technologists keep writing, then `npm run restore`.
// References outside Cristae: SQLite's own integrity_check on the copy, the PDF bytes the running server serves,
// SHA-256 from node:crypto (FIPS 180-4), and PDF files start with "%PDF-" (ISO 32000-1 §7.5.2 [confirmed]).

const sha256 = (b: Buffer | Uint8Array) => createHash('sha256').update(b).digest('hex');

let dir: string;
let dbPath: string;
let backupFile: string;
let server: ServerProcess;

async function signIn(origin: string, email: string): Promise<(method: string, url: string, body?: unknown) => Promise<Response>> {
  const login = await fetch(`${origin}/api/auth/login`, {
    method: 'POST',
    headers: { Origin: origin, 'Content-Type': 'application/json' },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  if (login.status !== 200) throw new Error(`sign-in ${email}: ${login.status}`);
  const cookie = login.headers.getSetCookie()[0]!.split(';')[0]!;
  return (method, url, body) =>
    fetch(`${origin}${url}`, {
      method,
      headers: { Origin: origin, Cookie: cookie, ...(body ? { 'Content-Type': 'application/json' } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    });
}

async function query<T>(file: string, sql: string): Promise<T[]> {
  const db = await openSqliteFile(file, { readOnly: true });
  try {
    return await db.all<T>(sql);
  } finally {
    await db.close();
  }
}

const restore = (file: string) => runTs('scripts/restore.ts', [file], { DATABASE_PATH: dbPath });
const fileHash = (file: string) => sha256(fs.readFileSync(file));
const leftovers = () => fs.readdirSync(dir).filter((f) => f.includes('.restore-') || f.includes('.partial-'));

/** The served PDF of every signed report, by id, read through the API as the director. */
async function servedPdfs(origin: string): Promise<Map<number, Buffer>> {
  const director = await signIn(origin, 'director@demo.test');
  const ids = (await query<{ id: number }>(dbPath, 'SELECT id FROM reports ORDER BY id')).map((r) => r.id);
  const out = new Map<number, Buffer>();
  for (const id of ids) {
    const res = await director('GET', `/api/reports/${id}/pdf`);
    expect(res.status).toBe(200);
    out.set(id, Buffer.from(await res.arrayBuffer()));
  }
  return out;
}
let pdfsBefore: Map<number, Buffer>;
let patientsInBackup: number;

beforeAll(async () => {
  dir = tempDataDir();
  dbPath = path.join(dir, 'cristae.sqlite');
  backupFile = path.join(dir, 'nightly.sqlite');
  server = await startServerProcess({ NODE_ENV: 'development' }, dbPath);
  pdfsBefore = await servedPdfs(server.origin);
}, 240_000);
afterAll(async () => {
  await server.stop();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('npm run backup', () => {
  it('takes a consistent, verified copy while patients are being registered, and prints the row counts it checked', async () => {
    expect(pdfsBefore.size).toBeGreaterThan(0);
    const tech = await signIn(server.origin, 'technologist@demo.test');
    let acknowledged = 0;
    let writing = true;
    const writer = async (lane: number) => {
      for (let n = 0; writing; n++) {
        const res = await tech('POST', '/api/patients', buildPatientInput({ labPatientId: `BK-${lane}-${n}` }));
        expect(res.status).toBe(201);
        acknowledged += 1;
      }
    };
    const lanes = [1, 2, 3].map(writer);
    while (acknowledged < 5) await new Promise((r) => setTimeout(r, 20));

    const acknowledgedBefore = acknowledged;
    const result = await runTs('scripts/backup.ts', [backupFile], { DATABASE_PATH: dbPath });
    const acknowledgedAfter = acknowledged;
    writing = false;
    await Promise.all(lanes);

    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    expect(result.stdout).toContain(`backup written and verified: ${backupFile}`);
    expect(acknowledgedAfter).toBeGreaterThan(acknowledgedBefore);

    // SQLite's own check of the copy, through a connection of its own.
    expect(await query(backupFile, 'PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
    // A single self-contained file: rollback journal, nothing in a -wal beside it.
    expect(await query(backupFile, 'PRAGMA journal_mode')).toEqual([{ journal_mode: 'delete' }]);

    // Consistent as of one moment: everything acknowledged before the backup began is in it, nothing that was
    // not yet written when it ended (3 writers may each have had one write committed but not yet acknowledged).
    const [{ n: copied }] = (await query<{ n: number }>(backupFile, "SELECT COUNT(*) AS n FROM patients WHERE labPatientId LIKE 'BK-%'")) as [{ n: number }];
    expect(copied).toBeGreaterThanOrEqual(acknowledgedBefore);
    expect(copied).toBeLessThanOrEqual(acknowledgedAfter + 3);
    patientsInBackup = copied;
    // ...and no half transactions: each patient's row and its audit event were committed together.
    const orphans = await query<{ patients: number; events: number }>(
      backupFile,
      `SELECT
         (SELECT COUNT(*) FROM patients p WHERE p.labPatientId LIKE 'BK-%' AND NOT EXISTS
            (SELECT 1 FROM audit_events a WHERE a.entity = 'patient' AND a.action = 'create' AND a.entityId = CAST(p.id AS TEXT))) AS patients,
         (SELECT COUNT(*) FROM audit_events a WHERE a.entity = 'patient' AND a.action = 'create' AND NOT EXISTS
            (SELECT 1 FROM patients p WHERE CAST(p.id AS TEXT) = a.entityId)) AS events`,
    );
    expect(orphans).toEqual([{ patients: 0, events: 0 }]);

    // Every printed row count is what a separate COUNT(*) of the copy finds.
    const printed = [...result.stdout.matchAll(/^ {2}(\S+)\s+(\d+)$/gm)].map((m) => [m[1]!, Number(m[2])] as const);
    const tables = await query<{ name: string }>(backupFile, "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
    expect(printed.map(([name]) => name)).toEqual(tables.map((t) => t.name));
    for (const [name, rows] of printed) {
      expect((await query<{ n: number }>(backupFile, `SELECT COUNT(*) AS n FROM "${name}"`))[0]!.n, name).toBe(rows);
    }
    expect(result.stdout).toContain(`SHA-256 of report PDFs: ${pdfsBefore.size} of ${pdfsBefore.size} match`);

    // The PDFs in the copy are byte for byte what the server hands out, and hash to the recorded value.
    const stored = await query<{ id: number; pdf: Buffer; pdfSha256: string }>(backupFile, 'SELECT id, pdf, pdfSha256 FROM reports ORDER BY id');
    expect(stored.map((r) => r.id)).toEqual([...pdfsBefore.keys()]);
    for (const r of stored) {
      expect(r.pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
      expect(r.pdf.equals(pdfsBefore.get(r.id)!)).toBe(true);
      expect(sha256(r.pdf)).toBe(r.pdfSha256);
    }
    expect(leftovers()).toEqual([]);
  }, 240_000);

  it('when the file already exists, then it refuses (exit 1) and leaves that file alone', async () => {
    const before = fileHash(backupFile);
    const result = await runTs('scripts/backup.ts', [backupFile], { DATABASE_PATH: dbPath });
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/backup refused: .*already exists/);
    expect(fileHash(backupFile)).toBe(before);
  }, 60_000);
});

describe('npm run restore', () => {
  it('when the server is running, then it refuses and the live database keeps working', async () => {
    const result = await restore(backupFile);
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/restore refused: .*server running/);
    const tech = await signIn(server.origin, 'technologist@demo.test');
    expect((await tech('POST', '/api/patients', buildPatientInput({ labPatientId: 'AFTER-REFUSAL' }))).status).toBe(201);
    expect(leftovers()).toEqual([]);
  }, 60_000);

  it.each([
    [
      'a byte flipped inside every stored PDF',
      (bytes: Buffer) => {
        for (let at = bytes.indexOf('%PDF-'); at >= 0; at = bytes.indexOf('%PDF-', at + 1)) bytes[at + 300] = bytes[at + 300]! ^ 0xff;
        return bytes;
      },
      /report PDF\(s\) no longer match their recorded SHA-256 \(reports id/,
    ],
    ['the file cut in half', (bytes: Buffer) => bytes.subarray(0, Math.floor(bytes.length / 2)), /(cannot be read as a SQLite database|integrity_check found damage)/],
    ['a text file', () => Buffer.from('patients,cases\n1,2\n'), /cannot be read as a SQLite database/],
  ])('when the copy has %s, then it refuses (exit 1) naming the check, and the database is not touched', async (_what, damage, message) => {
    if ((await server.stop()) === null) throw new Error('server did not stop');
    const damaged = path.join(dir, 'damaged.sqlite');
    fs.writeFileSync(damaged, damage(Buffer.from(fs.readFileSync(backupFile))));
    const before = fileHash(dbPath);
    const result = await restore(damaged);
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/restore refused: the backup failed its checks; the database was not changed/);
    expect(result.stderr).toMatch(message);
    expect(fileHash(dbPath)).toBe(before);
    expect(leftovers()).toEqual([]);
  }, 60_000);

  it('when the copy is sound and the server stopped, then it replaces the database, keeps the old one, and the app serves the restored data', async () => {
    const result = await restore(backupFile);
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    // The replaced database is kept whole, with the writes the restore takes away.
    const kept = /the replaced database is kept as (.+)$/m.exec(result.stdout)![1]!;
    expect(await query(kept, 'PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
    expect(await query(kept, "SELECT labPatientId FROM patients WHERE labPatientId = 'AFTER-REFUSAL'")).toHaveLength(1);

    // Writes made after the backup (the rest of the writers' patients, AFTER-REFUSAL) are gone; the copy's are back.
    const [{ n }] = (await query<{ n: number }>(dbPath, "SELECT COUNT(*) AS n FROM patients WHERE labPatientId LIKE 'BK-%'")) as [{ n: number }];
    expect(n).toBe(patientsInBackup);
    expect(await query(dbPath, "SELECT id FROM patients WHERE labPatientId = 'AFTER-REFUSAL'")).toEqual([]);

    server = await startServerProcess({ NODE_ENV: 'development' }, dbPath);
    const pdfsAfter = await servedPdfs(server.origin);
    expect([...pdfsAfter.keys()]).toEqual([...pdfsBefore.keys()]);
    for (const [id, pdf] of pdfsAfter) expect(pdf.equals(pdfsBefore.get(id)!)).toBe(true);
    expect(leftovers()).toEqual([]);
  }, 240_000);
});
