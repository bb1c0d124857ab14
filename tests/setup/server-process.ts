import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort } from './free-port';

export const ROOT = path.resolve(import.meta.dirname, '..', '..');

export type ProcessResult = { code: number | null; stdout: string; stderr: string };

/** The parent's environment without any of the settings under test, so each test says exactly what it sets. */
function baseEnv(): NodeJS.ProcessEnv {
  const env = { ...process.env };
  for (const k of Object.keys(env)) {
    if (/^(NODE_ENV|SESSION_SECRET|TRUST_PROXY|SEED_DEMO|DEMO_PASSWORD|APP_ORIGIN|DATABASE_PATH|DATABASE_URL|PORT|ADMIN_PASSWORD|BOOTSTRAP_ADMIN_|SMTP_)/.test(k)) delete env[k];
  }
  return env;
}

export function tempDataDir(): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-ops-'));
}

/** Runs a TypeScript entry point (server/index.ts, scripts/*.ts) the way npm does, to its end. */
export function runTs(entry: string, args: string[], env: Record<string, string>, stdin?: string): Promise<ProcessResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', entry, ...args], {
      cwd: ROOT,
      env: { ...baseEnv(), ...env },
      stdio: ['pipe', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
    child.stdin.end(stdin ?? '');
  });
}

export type ServerProcess = {
  origin: string;
  port: number;
  dbPath: string;
  output: () => string;
  /** SIGTERM, then the exit code. */
  stop: () => Promise<number | null>;
};

/**
 * Starts the real server (`node --import tsx server/index.ts`) on a free port over `dbPath` and waits until
 * /api/health answers; throws with the server's output if it exits first. The answer counts only once the child has
 * said it is serving on that port: between choosing a free port and the child binding it, another test's server can
 * take the same port, and its answers (a production server refusing this origin with 403) were once taken for ours.
 * A child that finds its port taken is started again on another.
 */
export async function startServerProcess(env: Record<string, string>, dbPath: string): Promise<ServerProcess> {
  for (let tries = 1; ; tries++) {
    try {
      return await startOnFreePort(env, dbPath);
    } catch (err) {
      if (!(err instanceof PortTaken) || tries >= 3) throw err;
    }
  }
}

class PortTaken extends Error {}

async function startOnFreePort(env: Record<string, string>, dbPath: string): Promise<ServerProcess> {
  const port = await freePort();
  const smtpPort = await freePort();
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: ROOT,
    env: { ...baseEnv(), PORT: String(port), LOCAL_SMTP_PORT: String(smtpPort), DATABASE_PATH: dbPath, CRISTAE_QUIET: '0', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr.on('data', (d: Buffer) => (log += d.toString()));
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const origin = `http://localhost:${port}`;
  const serving = `serving on http://localhost:${port}`;
  for (let attempt = 0; ; attempt++) {
    if (child.exitCode !== null) {
      if (log.includes('EADDRINUSE')) throw new PortTaken(`port ${port} was taken:\n${log}`);
      throw new Error(`server exited with ${child.exitCode}:\n${log}`);
    }
    try {
      if (log.includes(serving) && (await fetch(`${origin}/api/health`)).ok) break;
    } catch {
      /* not listening yet */
    }
    if (attempt > 600) {
      child.kill('SIGKILL');
      throw new Error(`server did not answer:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    origin,
    port,
    dbPath,
    output: () => log,
    stop: async () => {
      if (child.exitCode === null) child.kill('SIGTERM');
      return exited;
    },
  };
}
