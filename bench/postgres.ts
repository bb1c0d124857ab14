import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { load, p50p95, percentile, pooled, roundRatios, type LoadResult } from './support/load';
import { ROOT, serverCommand, signIn, spawnUntilHealthy, startFloorServer } from './support/server';
import type { BenchResult } from './types';

/*
 * PostgreSQL with two application processes behind one port (bench/support/two-processes.mjs, node:cluster).
 * `run()` starts a throw-away PostgreSQL server through scripts/with-postgres.sh (fsync on: PG_DURABLE=1) and
 * runs this file again inside it (`--inner <result.json>`), which measures:
 * - the case list (GET /api/cases, demo data) at 20 clients, against the bare-Express floor of the same run;
 * - the mixed load: 20 writers registering patients (POST /api/patients) and 20 readers of the case list at
 *   once; afterwards every acknowledged write must be in the database (counted there, not from the answers).
 */
const CONNECTIONS = 20;
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 10);
/** The case list and its floor take turns this many times, DURATION_S / 2 each (roundRatios). */
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
const ROUND_S = DURATION_S / 2;
const GOAL_LIST_P95_MS = 25;
const GOAL_LIST_RATIO = 3;
const GOAL_WRITE_P95_MS = 300;
const GOAL_READ_P95_MS = 150;
const WORKERS = 2;

type Inner = { rows: BenchResult['rows']; kind: string; loadAverage: number };

async function startTwoProcesses(databaseUrl: string) {
  const { args, kind } = serverCommand();
  const launcher = path.join(ROOT, 'bench', 'support', 'two-processes.mjs');
  const started = await spawnUntilHealthy(
    [launcher, String(WORKERS), ...args],
    {
      NODE_ENV: 'development',
      CRISTAE_QUIET: '1',
      DATABASE_URL: databaseUrl,
      DATABASE_PATH: path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-bench-pg-')), 'unused.sqlite'),
      LOCAL_SMTP_PORT: '0',
    },
    (p) => `http://localhost:${p}/api/health`,
  );
  for (const deadline = Date.now() + 120_000; !started.log().includes(`all ${WORKERS} listening`); ) {
    if (Date.now() > deadline) throw new Error(`the ${WORKERS} processes did not all listen:\n${started.log()}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  return {
    origin: `http://localhost:${started.port}`,
    kind,
    stop: () =>
      new Promise<void>((resolve) => {
        started.child.once('exit', () => resolve());
        started.child.kill('SIGTERM');
      }),
  };
}

async function inner(out: string): Promise<void> {
  const loadAverage = os.loadavg()[0]!;
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('run through scripts/with-postgres.sh (DATABASE_URL is not set)');
  const floor = await startFloorServer();
  const app = await startTwoProcesses(databaseUrl);
  const db = new pg.Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    const cookie = await signIn(app.origin, 'technologist@demo.test');
    const headers = { 'content-type': 'application/json', origin: app.origin, cookie };
    await load({ url: `${app.origin}/api/cases`, connections: 4, durationS: 2, headers });
    await load({ url: `${floor.origin}/api/cases`, connections: 4, durationS: 1 });

    const rounds: { floor: LoadResult; app: LoadResult }[] = [];
    for (let i = 0; i < ROUNDS; i++) {
      const floorRun = await load({ url: `${floor.origin}/api/cases`, connections: CONNECTIONS, durationS: ROUND_S });
      rounds.push({ floor: floorRun, app: await load({ url: `${app.origin}/api/cases`, connections: CONNECTIONS, durationS: ROUND_S, headers }) });
    }
    const floorList = pooled(rounds.map((r) => r.floor), ROUND_S);
    const list = pooled(rounds.map((r) => r.app), ROUND_S);
    const { median: ratio, each } = roundRatios(rounds);

    let sent = 0;
    const prefix = `PGB${Date.now().toString(36).toUpperCase()}`;
    const [writes, reads] = await Promise.all([
      load({
        url: app.origin,
        connections: CONNECTIONS,
        durationS: DURATION_S,
        headers,
        requests: [
          {
            method: 'POST',
            path: '/api/patients',
            setupRequest: (req) => {
              const n = ++sent;
              const body = { labPatientId: `${prefix}-${n}`, familyName: `Benchmark${n}`, givenName: 'Load', dateOfBirth: '2011-03-04', sex: 'female' };
              return { ...req, body: JSON.stringify(body) };
            },
          },
        ],
      }),
      load({ url: `${app.origin}/api/cases`, connections: CONNECTIONS, durationS: DURATION_S, headers }),
    ]);
    const stored = Number(
      (await db.query<{ n: string }>('SELECT COUNT(*) AS n FROM patients WHERE "labPatientId" LIKE $1', [`${prefix}-%`])).rows[0]!.n,
    );

    const p95 = (r: LoadResult) => percentile(r.latencies, 95);
    const rows: BenchResult['rows'] = [
      { metric: 'floor: GET at 20 clients (bare Express, one process)', value: `${p50p95(floorList)}; ${floorList.perSecond} req/s`, goal: '—', met: floorList.errors === 0 },
      {
        metric: 'GET /api/cases (case list, demo data), 20 clients',
        value: `${p50p95(list)}; ${list.perSecond} req/s; ${list.errors} errors`,
        goal: `p95 < ${GOAL_LIST_P95_MS} ms, no errors`,
        met: p95(list) < GOAL_LIST_P95_MS && list.errors === 0,
      },
      { metric: `case list: p95 ÷ floor p95, median of ${ROUNDS} rounds`, value: `${ratio.toFixed(2)}×; rounds ${each}`, goal: `≤ ${GOAL_LIST_RATIO}×`, met: ratio <= GOAL_LIST_RATIO },
      {
        metric: 'mixed: POST /api/patients, 20 writers',
        value: `${p50p95(writes)}; ${writes.ok} acknowledged (${writes.perSecond} answers/s); ${writes.errors} errors`,
        goal: `p95 < ${GOAL_WRITE_P95_MS} ms, no errors`,
        met: p95(writes) < GOAL_WRITE_P95_MS && writes.errors === 0,
      },
      {
        metric: 'mixed: GET /api/cases, 20 readers at the same time',
        value: `${p50p95(reads)}; ${reads.perSecond} req/s; ${reads.errors} errors`,
        goal: `p95 < ${GOAL_READ_P95_MS} ms, no errors`,
        met: p95(reads) < GOAL_READ_P95_MS && reads.errors === 0,
      },
      {
        metric: 'mixed: acknowledged writes found in the database afterwards',
        value: `${stored} stored of ${writes.ok} acknowledged (${sent} sent)`,
        goal: 'every acknowledged write stored',
        met: stored >= writes.ok && stored <= sent,
      },
    ];
    fs.writeFileSync(out, JSON.stringify({ rows, kind: app.kind, loadAverage } satisfies Inner));
  } finally {
    await db.end();
    await app.stop();
    await floor.stop();
  }
}

export default async function run(): Promise<BenchResult> {
  const out = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-bench-pg-')), 'result.json');
  const code = await new Promise<number | null>((resolve, reject) => {
    const child = spawn('bash', [path.join(ROOT, 'scripts', 'with-postgres.sh'), process.execPath, '--import', 'tsx', 'bench/postgres.ts', '--inner', out], {
      cwd: ROOT,
      env: { ...process.env, PG_DURABLE: '1' },
      stdio: ['ignore', 'inherit', 'inherit'],
    });
    child.on('error', reject);
    child.on('exit', resolve);
  });
  if (code !== 0 || !fs.existsSync(out)) throw new Error(`the PostgreSQL run ended with status ${code}`);
  const { rows, kind, loadAverage } = JSON.parse(fs.readFileSync(out, 'utf8')) as Inner;
  return {
    title: `PostgreSQL, ${WORKERS} application processes behind one port: case list (${ROUNDS} rounds of ${ROUND_S} s, taking turns with the floor) and mixed load (${DURATION_S} s), ${CONNECTIONS} clients each (autocannon, loopback)`,
    rows,
    notes:
      `PostgreSQL ${'15'} from Debian's packages in a temporary directory (scripts/with-postgres.sh, fsync and synchronous commit on), ` +
      `${WORKERS} application processes (${kind === 'compiled' ? 'the compiled server' : 'TypeScript sources through tsx'}) sharing one port through node:cluster, ` +
      'the database server, the floor and the load generator all on the same 2-core machine. In each process, writes that wait together run ' +
      'as one transaction (group commit, each answered after that commit), which takes one advisory lock (server/db/write-transaction.ts), ' +
      'so writes stay one at a time across both processes, as on SQLite. The case list\'s landing page is a named prepared ' +
      'statement on each pooled connection (server/db/prepared-read.ts): bound and run, not parsed and planned again. The floor is the bare Express ' +
      'handler of bench/floor-server.mjs, measured in the same run. ' +
      `The machine's one-minute load average when the run began: ${loadAverage.toFixed(1)} (other work on the same 2 cores slows the floor and the application alike).`,
  };
}

const innerAt = process.argv.indexOf('--inner');
if (innerAt > 0) {
  inner(process.argv[innerAt + 1]!).then(
    () => process.exit(0),
    (err: unknown) => {
      console.error(err);
      process.exit(1);
    },
  );
}
