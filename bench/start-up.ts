import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { loadNote, ms } from './support/load';
import { ROOT, startBenchServer } from './support/server';
import type { BenchResult } from './types';

/*
 * Start-up, compressed assets and the first report:
 * - the compiled server (npm start's command) from spawn to its first healthy answer on an existing database,
 *   three times, beside the TypeScript sources through tsx, the way it ran before;
 * - the bytes of the sign-in page's scripts and styles as sent plain, gzip and brotli;
 * - the first report PDF in a fresh process, without and with the start-up warm-up, and later ones.
 */

const STARTS = 3;
const GOAL_START_MS = 1500;
const GOAL_FIRST_PDF_MS = 300;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

function rawSize(origin: string, urlPath: string, encoding: string): Promise<{ bytes: number; coding: string }> {
  return new Promise((resolve, reject) => {
    http
      .get(`${origin}${urlPath}`, { headers: encoding ? { 'accept-encoding': encoding } : {} }, (res) => {
        let bytes = 0;
        res.on('data', (c: Buffer) => (bytes += c.length));
        res.on('end', () => resolve({ bytes, coding: String(res.headers['content-encoding'] ?? 'identity') }));
      })
      .on('error', reject);
  });
}

function renderInFreshProcess(warm: boolean): { warmUpMs: number | null; firstMs: number; laterMs: number[] } {
  const out = execFileSync(process.execPath, ['--import', 'tsx', path.join('bench', 'report-pdf-child.ts'), ...(warm ? ['warm'] : [])], {
    cwd: ROOT,
    encoding: 'utf8',
  });
  return JSON.parse(out.trim().split('\n').at(-1)!) as { warmUpMs: number | null; firstMs: number; laterMs: number[] };
}

export default async function run(): Promise<BenchResult> {
  if (!fs.existsSync(path.join(ROOT, 'dist', 'server', 'index.js'))) {
    execFileSync(process.execPath, [path.join(ROOT, 'scripts', 'build-server.mjs'), '--quiet'], { cwd: ROOT });
  }
  const rows: BenchResult['rows'] = [];
  // A database with the demo data, made by a first start.
  const first = await startBenchServer();
  await first.stop();
  const dataDir = first.dataDir;

  const compiled: number[] = [];
  const compiledCpu: number[] = [];
  let assets: { file: string; plain: number; gzip: number; br: number }[] = [];
  for (let i = 0; i < STARTS; i++) {
    const s = await startBenchServer({ dataDir });
    compiled.push(s.startMs);
    compiledCpu.push(s.cpuMs());
    if (i === 0) {
      const html = await (await fetch(`${s.origin}/`)).text();
      const files = [...html.matchAll(/(?:src|href)="(\/assets\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]!);
      assets = await Promise.all(
        files.map(async (file) => ({
          file,
          plain: (await rawSize(s.origin, file, '')).bytes,
          gzip: (await rawSize(s.origin, file, 'gzip')).bytes,
          br: (await rawSize(s.origin, file, 'br, gzip')).bytes,
        })),
      );
    }
    await s.stop();
  }
  process.env.BENCH_SERVER = 'tsx';
  const viaTsx = await startBenchServer({ dataDir });
  await viaTsx.stop();
  delete process.env.BENCH_SERVER;

  const startMedian = median(compiled);
  rows.push(
    { metric: 'compiled server: spawn to first healthy answer, existing database (median of 3)', value: `${ms(startMedian)} (${compiled.map((x) => x.toFixed(0)).join(', ')} ms)`, goal: `< ${GOAL_START_MS} ms`, met: startMedian < GOAL_START_MS },
    {
      metric: 'compiled server: CPU time of the process up to that answer (median of 3)',
      value: `${ms(median(compiledCpu))} (${compiledCpu.map((x) => x.toFixed(0)).join(', ')} ms)`,
      goal: '—',
      met: true,
    },
    { metric: 'the same through tsx (TypeScript loader, as before)', value: ms(viaTsx.startMs), goal: '—', met: true },
    { metric: 'compiled ÷ tsx, same run', value: `${(startMedian / viaTsx.startMs).toFixed(2)}×`, goal: '—', met: true },
  );
  const sum = (k: 'plain' | 'gzip' | 'br') => assets.reduce((n, a) => n + a[k], 0);
  const kB = (n: number) => `${(n / 1024).toFixed(0)} kB`;
  rows.push({
    metric: `sign-in page scripts and styles (${assets.length} files): plain / gzip / brotli`,
    value: `${kB(sum('plain'))} / ${kB(sum('gzip'))} / ${kB(sum('br'))}`,
    goal: 'compressed when asked',
    met: assets.length > 0 && sum('br') < sum('plain') / 2 && sum('gzip') < sum('plain') / 2,
  });

  const cold = renderInFreshProcess(false);
  const warm = renderInFreshProcess(true);
  rows.push(
    { metric: 'first report PDF in a fresh process, no warm-up', value: ms(cold.firstMs), goal: '—', met: true },
    { metric: 'first report PDF after the start-up warm-up (as the server runs)', value: `${ms(warm.firstMs)} (warm-up ${ms(warm.warmUpMs ?? 0)}, run after listening)`, goal: `< ${GOAL_FIRST_PDF_MS} ms`, met: warm.firstMs < GOAL_FIRST_PDF_MS },
    { metric: 'later reports (floor: median of 5)', value: ms(median(warm.laterMs)), goal: '—', met: true },
  );
  fs.rmSync(dataDir, { recursive: true, force: true });
  return {
    title: 'Start-up, compressed assets and the first report',
    rows,
    notes:
      'Start-up is timed from spawning `node --require ./scripts/threadpool.cjs dist/server/index.js` (npm start after its build) to the first 200 from /api/health, ' +
      'polled every 10 ms, on a database the first start had migrated and seeded. CPU time is user + system time of the server process (/proc) when the answer came: ' +
      'it grows much less than the wall-clock time when other work shares the machine, and the compiled ÷ tsx ratio of the same run is a rough guide as well. Asset sizes are the bytes on the wire for the files index.html ' +
      'references, asked with no Accept-Encoding, with gzip, and with "br, gzip". The first report is a two-specimen report (invented test document), ' +
      `rendered in a new process after its modules have loaded; the later ones are one-specimen reports in the same process. ${loadNote()}`,
  };
}
