import autocannon from 'autocannon';
import { startServer } from '../tests/e2e/support/server';
import type { BenchResult } from './types';

/*
 * POST /api/calculations/activity under load: 20 concurrent clients on loopback for 10 s, each sending a
 * 60-point total and background trace as a signed-in technologist. The server runs in its own process
 * (the same start-up as npm start) so the load generator does not share its event loop.
 */

const CONNECTIONS = 20;
const DURATION_S = 10;
const GOAL_P95_MS = 50;

const trace = (a0: number, perMin: number) =>
  Array.from({ length: 60 }, (_, i) => ({ t: i * 5, a: +(a0 + (perMin / 60) * i * 5 + Math.sin(i) * 0.0003).toFixed(5) }));

function percentile(sorted: number[], p: number): number {
  const idx = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[idx]!;
}

export default async function run(): Promise<BenchResult> {
  const server = await startServer({ CRISTAE_QUIET: '1' });
  try {
    const login = await fetch(`${server.origin}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: server.origin },
      body: JSON.stringify({ email: 'technologist@demo.test', password: 'cristae-demo' }),
    });
    const cookie = (login.headers.get('set-cookie') ?? '').split(';')[0]!;
    if (!login.ok || !cookie) throw new Error(`sign-in failed: ${login.status}`);
    const body = JSON.stringify({
      assay: 'CI',
      pathlengthCm: 1,
      reactionVolumeUl: 1000,
      sampleVolumeUl: 10,
      proteinMgPerMl: 4,
      total: trace(1.2, -0.0348),
      background: trace(1.1, -0.01),
    });
    const times: number[] = [];
    let non2xx = 0;
    const result = await new Promise<autocannon.Result>((resolve, reject) => {
      const instance = autocannon(
        {
          url: `${server.origin}/api/calculations/activity`,
          method: 'POST',
          connections: CONNECTIONS,
          duration: DURATION_S,
          headers: { 'content-type': 'application/json', origin: server.origin, cookie },
          body,
        },
        (err, res) => (err ? reject(err) : resolve(res)),
      );
      instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => {
        if (status === 200) times.push(ms);
        else non2xx++;
      });
    });
    times.sort((a, b) => a - b);
    const p50 = percentile(times, 50);
    const p95 = percentile(times, 95);
    return {
      title: `POST /api/calculations/activity, ${CONNECTIONS} concurrent clients for ${DURATION_S} s (autocannon, loopback)`,
      rows: [
        { metric: 'requests answered 200', value: String(times.length), goal: '> 0, no errors', met: times.length > 0 && non2xx === 0 && result.errors === 0 },
        { metric: 'throughput', value: `${Math.round(result.requests.average)} req/s`, goal: '—', met: true },
        { metric: 'latency p50', value: `${p50.toFixed(1)} ms`, goal: '—', met: true },
        { metric: 'latency p95', value: `${p95.toFixed(1)} ms`, goal: `< ${GOAL_P95_MS} ms`, met: p95 < GOAL_P95_MS },
        { metric: 'latency max', value: `${Math.max(...times).toFixed(1)} ms`, goal: '—', met: true },
      ],
      notes: `Non-200 answers: ${non2xx}; socket errors: ${result.errors}. Each request carries two 60-point traces.`,
    };
  } finally {
    await server.stop();
  }
}
