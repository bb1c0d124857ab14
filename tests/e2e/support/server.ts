import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { inject } from 'vitest';
import { openSqliteFile } from '../../../server/ops/sqlite-file';
import { freePort } from '../../setup/free-port';

export type RunningServer = {
  origin: string;
  port: number;
  dataDir: string;
  stop: () => Promise<void>;
  /** kill -9: no shutdown handler runs (fault tests). */
  kill: () => Promise<void>;
};

export const DATABASE_FILE = 'cristae.sqlite';
/** The name under which the e2e project's global set-up provides its seeded database (tests/e2e/support/template.ts). */
export const E2E_TEMPLATE_KEY = 'e2eTemplate';

declare module 'vitest' {
  interface ProvidedContext {
    e2eTemplate: string;
  }
}

/** Settings that change what a first start writes into a new database: with any of them the server seeds its own. */
const SEEDING_SETTINGS = /^(NODE_ENV|SEED_DEMO|DEMO_PASSWORD|DATABASE_|BOOTSTRAP_ADMIN_)/;

/**
 * Starts the real server (the same command as npm start, minus the build, which npm test has done) on a free
 * port with a fresh database, so the browser sees exactly what a user would. Pass `dataDir` to start again on
 * the database a stopped (or killed) server left behind.
 * A fresh database is a copy of the one the run's first server seeded (tests/e2e/support/template.ts) unless
 * `extraEnv` changes what seeding writes: the start-up then migrates and seeds nothing, and the seeded report
 * notices, still waiting in the copy's outbox, are delivered by this server's own mail worker.
 */
export async function startServer(extraEnv: Record<string, string> = {}, opts: { dataDir?: string } = {}): Promise<RunningServer> {
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-e2e-'));
  const database = path.join(dataDir, DATABASE_FILE);
  const template = inject(E2E_TEMPLATE_KEY);
  if (template && !fs.existsSync(database) && !Object.keys(extraEnv).some((k) => SEEDING_SETTINGS.test(k))) {
    const source = await openSqliteFile(template, { readOnly: true });
    try {
      await source.backupTo(database);
    } finally {
      await source.close();
    }
  }
  return spawnServer(extraEnv, dataDir);
}

/**
 * The server process on `dataDir`'s database, as it is (empty: the server migrates and seeds it); fails when
 * /api/health has not answered within `deadlineS` seconds.
 */
export async function spawnServer(extraEnv: Record<string, string>, dataDir: string, deadlineS = 90): Promise<RunningServer> {
  const root = path.resolve(import.meta.dirname, '..', '..', '..');
  if (!fs.existsSync(path.join(root, 'dist', 'client', 'index.html'))) {
    throw new Error('dist/client is missing: run `npx vite build` (npm test does it before the tests)');
  }
  const port = await freePort();
  const smtpPort = await freePort();
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'development',
      PORT: String(port),
      LOCAL_SMTP_PORT: String(smtpPort),
      DATABASE_PATH: path.join(dataDir, DATABASE_FILE),
      CRISTAE_QUIET: '0',
      ...extraEnv,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const origin = `http://localhost:${port}`;
  const deadline = Date.now() + deadlineS * 1000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      const res = await fetch(`${origin}/api/health`);
      if (res.ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`server did not answer within ${deadlineS} s:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    origin,
    port,
    dataDir,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
        setTimeout(() => child.kill('SIGKILL'), 5000).unref();
      }),
    kill: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGKILL');
      }),
  };
}
