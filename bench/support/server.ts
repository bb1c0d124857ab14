import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { freePort } from '../../tests/setup/free-port';

export const ROOT = path.resolve(import.meta.dirname, '..', '..');
const COMPILED = path.join(ROOT, 'dist', 'server', 'index.js');

export type BenchServer = {
  origin: string;
  dataDir: string;
  /** Milliseconds from spawning the process to the first 200 from /api/health. */
  startMs: number;
  /** Which server ran: the compiled bundle or the TypeScript sources through tsx. */
  kind: 'compiled' | 'tsx';
  stop: () => Promise<void>;
  /** SIGKILL: no shutdown handler runs. */
  kill: () => Promise<void>;
  /** CPU time the server process has used so far, ms (user + system; NaN where /proc is missing). */
  cpuMs: () => number;
};

/**
 * CPU time of a process from /proc/<pid>/stat (utime + stime, in clock ticks of 10 ms on Linux). Unlike
 * latency, CPU per request hardly depends on what else the machine is running.
 */
export function processCpuMs(pid: number | undefined): number {
  try {
    const fields = fs.readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return NaN;
  }
}

/**
 * The compiled server (dist/server, what `npm start` runs) when it has been built, else the TypeScript sources
 * through tsx; BENCH_SERVER=tsx forces the sources (for before/after comparisons).
 */
export function serverCommand(): { args: string[]; kind: BenchServer['kind'] } {
  if (process.env.BENCH_SERVER !== 'tsx' && fs.existsSync(COMPILED)) {
    return { args: ['--require', './scripts/threadpool.cjs', COMPILED], kind: 'compiled' };
  }
  return { args: ['--import', 'tsx', 'server/index.ts'], kind: 'tsx' };
}

function waitForExit(child: ChildProcess, signal: NodeJS.Signals): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once('exit', () => resolve());
    child.kill(signal);
  });
}

/** Spawns a process and polls `healthUrl` every 10 ms until it answers 200. */
export async function spawnUntilHealthy(
  args: string[],
  env: Record<string, string>,
  healthUrl: (port: number) => string,
): Promise<{ child: ChildProcess; port: number; startMs: number; log: () => string }> {
  const port = await freePort();
  const started = performance.now();
  const child = spawn(process.execPath, args, {
    cwd: ROOT,
    env: { ...process.env, PORT: String(port), ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  for (const deadline = Date.now() + 120_000; ; ) {
    if (child.exitCode !== null) throw new Error(`process exited early:\n${log}`);
    try {
      if ((await fetch(healthUrl(port))).ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`no answer within 120 s:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 10));
  }
  return { child, port, startMs: performance.now() - started, log: () => log };
}

/** Starts the application on a free port over `dataDir` (a fresh temporary folder unless given). */
export async function startBenchServer(opts: { dataDir?: string; env?: Record<string, string> } = {}): Promise<BenchServer> {
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-bench-'));
  const { args, kind } = serverCommand();
  const smtpPort = await freePort();
  const { child, port, startMs } = await spawnUntilHealthy(
    args,
    {
      NODE_ENV: 'development',
      CRISTAE_QUIET: '1',
      LOCAL_SMTP_PORT: String(smtpPort),
      DATABASE_PATH: path.join(dataDir, 'cristae.sqlite'),
      ...opts.env,
    },
    (p) => `http://localhost:${p}/api/health`,
  );
  return {
    origin: `http://localhost:${port}`,
    dataDir,
    startMs,
    kind,
    stop: () => waitForExit(child, 'SIGTERM'),
    kill: () => waitForExit(child, 'SIGKILL'),
    cpuMs: () => processCpuMs(child.pid),
  };
}

/** The bare Express floor (bench/floor-server.mjs) on a free port. */
export async function startFloorServer(): Promise<{ origin: string; stop: () => Promise<void>; cpuMs: () => number }> {
  const { child, port } = await spawnUntilHealthy([path.join(ROOT, 'bench', 'floor-server.mjs')], {}, (p) => `http://localhost:${p}/`);
  return { origin: `http://localhost:${port}`, stop: () => waitForExit(child, 'SIGTERM'), cpuMs: () => processCpuMs(child.pid) };
}

/** Signs in as a demo account and returns the session cookie. */
export async function signIn(origin: string, email: string, password = 'cristae-demo'): Promise<string> {
  const res = await fetch(`${origin}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin },
    body: JSON.stringify({ email, password }),
  });
  const cookie = (res.headers.get('set-cookie') ?? '').split(';')[0]!;
  if (!res.ok || !cookie) throw new Error(`sign-in as ${email} failed: ${res.status}`);
  return cookie;
}
