import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from '../../setup/free-port';

export type RunningServer = {
  origin: string;
  port: number;
  dataDir: string;
  stop: () => Promise<void>;
  /** kill -9: no shutdown handler runs (fault tests). */
  kill: () => Promise<void>;
};

/**
 * Starts the real server (the same command as npm start, minus the build, which npm test has done) on a free
 * port with a fresh database, so the browser sees exactly what a user would. Pass `dataDir` to start again on
 * the database a stopped (or killed) server left behind.
 */
export async function startServer(extraEnv: Record<string, string> = {}, opts: { dataDir?: string } = {}): Promise<RunningServer> {
  const root = path.resolve(import.meta.dirname, '..', '..', '..');
  if (!fs.existsSync(path.join(root, 'dist', 'client', 'index.html'))) {
    throw new Error('dist/client is missing: run `npx vite build` (npm test does it before the tests)');
  }
  const port = await freePort();
  const smtpPort = await freePort();
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-e2e-'));
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'development',
      PORT: String(port),
      LOCAL_SMTP_PORT: String(smtpPort),
      DATABASE_PATH: path.join(dataDir, 'cristae.sqlite'),
      CRISTAE_QUIET: '0',
      ...extraEnv,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const origin = `http://localhost:${port}`;
  const deadline = Date.now() + 90_000;
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
      throw new Error(`server did not answer within 90 s:\n${log}`);
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
