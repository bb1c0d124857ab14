import { load, loadNote, p50p95, percentile, pooled, roundRatios, type LoadResult } from './support/load';
import { signIn, startBenchServer, startFloorServer } from './support/server';
import type { BenchResult } from './types';

/*
 * The request path against its floor, in one run: 20 concurrent clients on loopback, first against a bare
 * Express handler that answers without reading the request (bench/floor-server.mjs), then against the
 * application signed in as the demo technologist: the activity preview (POST /api/calculations/activity with
 * two 60-point traces, the same body sent to the floor) and the case list (GET /api/cases). Goal: each within
 * 3× its floor's p95 and under 25 ms at p95.
 */

const CONNECTIONS = 20;
/** Seconds of load per target in each round. */
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 5);
/** Floor and application take turns this many times (roundRatios: the floor alone drifted 3,000–8,300 answers a second within an hour). */
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
const GOAL_P95_MS = 25;
const GOAL_RATIO = 3;

const trace = (a0: number, perMin: number) =>
  Array.from({ length: 60 }, (_, i) => ({ t: i * 5, a: +(a0 + (perMin / 60) * i * 5 + Math.sin(i) * 0.0003).toFixed(5) }));

export const previewBody = JSON.stringify({
  assay: 'CI',
  pathlengthCm: 1,
  reactionVolumeUl: 1000,
  sampleVolumeUl: 10,
  proteinMgPerMl: 4,
  total: trace(1.2, -0.0348),
  background: trace(1.1, -0.01),
});

export default async function run(): Promise<BenchResult> {
  const floor = await startFloorServer();
  const app = await startBenchServer();
  try {
    const cookie = await signIn(app.origin, 'technologist@demo.test');
    const json = { 'content-type': 'application/json' };
    const measure = async (target: { origin: string; cpuMs: () => number }, method: 'GET' | 'POST', path: string, withSession: boolean) => {
      const origin = target.origin;
      const cpuBefore = target.cpuMs();
      const result = await load({
        url: `${origin}${path}`,
        method,
        connections: CONNECTIONS,
        durationS: DURATION_S,
        headers: { ...json, origin, ...(withSession ? { cookie } : {}) },
        body: method === 'POST' ? previewBody : undefined,
      });
      return { ...result, cpuPerRequest: (target.cpuMs() - cpuBefore) / Math.max(1, result.latencies.length) };
    };
    // Warm both processes so the first timed run does not pay for JIT compilation.
    await load({ url: `${app.origin}/api/cases`, connections: 4, durationS: 2, headers: { cookie } });
    await load({ url: `${floor.origin}/api/cases`, connections: 4, durationS: 1 });

    type Measured = LoadResult & { cpuPerRequest: number };
    const rounds: { floorGet: Measured; list: Measured; floorPost: Measured; preview: Measured }[] = [];
    for (let i = 0; i < ROUNDS; i++) {
      const floorGet = await measure(floor, 'GET', '/api/cases', false);
      const list = await measure(app, 'GET', '/api/cases', true);
      const floorPost = await measure(floor, 'POST', '/api/calculations/activity', false);
      const preview = await measure(app, 'POST', '/api/calculations/activity', true);
      rounds.push({ floorGet, list, floorPost, preview });
    }

    const rows: BenchResult['rows'] = [];
    const pair = (label: string, app: 'list' | 'preview', base: 'floorGet' | 'floorPost') => {
      const cpu = (runs: Measured[]) => runs.reduce((sum, x) => sum + x.cpuPerRequest * x.latencies.length, 0) / Math.max(1, runs.reduce((n, x) => n + x.latencies.length, 0));
      const r = { ...pooled(rounds.map((x) => x[app]), DURATION_S), cpuPerRequest: cpu(rounds.map((x) => x[app])) };
      const f = { ...pooled(rounds.map((x) => x[base]), DURATION_S), cpuPerRequest: cpu(rounds.map((x) => x[base])) };
      const p95 = percentile(r.latencies, 95);
      const { median: ratio, each } = roundRatios(rounds.map((x) => ({ app: x[app], floor: x[base] })));
      rows.push(
        { metric: `floor for ${label} (bare Express)`, value: `${p50p95(f)}; ${f.perSecond} req/s`, goal: '—', met: f.errors === 0 },
        { metric: label, value: `${p50p95(r)}; ${r.perSecond} req/s; ${r.errors} errors`, goal: `p95 < ${GOAL_P95_MS} ms, no errors`, met: p95 < GOAL_P95_MS && r.errors === 0 },
        { metric: `${label}: p95 ÷ floor p95, median of ${ROUNDS} rounds`, value: `${ratio.toFixed(2)}×; rounds ${each}`, goal: `≤ ${GOAL_RATIO}×`, met: ratio <= GOAL_RATIO },
        {
          metric: `${label}: server CPU per request (floor)`,
          value: `${r.cpuPerRequest.toFixed(2)} ms (${f.cpuPerRequest.toFixed(2)} ms), ${(r.cpuPerRequest / f.cpuPerRequest).toFixed(1)}×`,
          goal: '—',
          met: true,
        },
      );
    };
    pair('POST /api/calculations/activity (preview)', 'preview', 'floorPost');
    pair('GET /api/cases (case list, demo data)', 'list', 'floorGet');
    return {
      title: `Request path against an empty-handler floor: ${CONNECTIONS} concurrent clients, ${ROUNDS} interleaved rounds of ${DURATION_S} s each (autocannon, loopback)`,
      rows,
      notes:
        `Server: ${app.kind === 'compiled' ? 'the compiled server (dist/server, as npm start runs it)' : 'TypeScript sources through tsx'}. ` +
        'Floor and application run in separate processes, measured in turn (floor, case list, floor, preview) round after round in the same run, with the load generator in ' +
        'the benchmark process (on this 2-core machine it competes with the server for CPU, in both measurements alike). ' +
        'The preview sends two 60-point traces (about 4 kB); the floor receives the same body and does not read it. ' +
        'CPU per request is the server process\'s user + system time over the run (/proc) divided by the answers: unlike latency, it hardly ' +
        `depends on other load on the machine. ${loadNote()}`,
    };
  } finally {
    await app.stop();
    await floor.stop();
  }
}
