import os from 'node:os';
import autocannon from 'autocannon';

export type LoadResult = {
  /** Latency of every answered request, ms, sorted. */
  latencies: number[];
  /** Answers with a 2xx status. */
  ok: number;
  /** Answers with any other status, plus socket errors and timeouts. */
  errors: number;
  statuses: Record<number, number>;
  perSecond: number;
};

export type LoadOptions = {
  url: string;
  connections: number;
  durationS: number;
  method?: 'GET' | 'POST';
  headers?: Record<string, string>;
  body?: string;
  /** A request sequence each connection cycles through (autocannon's `requests`). */
  requests?: autocannon.Request[];
};

/** autocannon on loopback; latency per answer from its 'response' event. */
export async function load(opts: LoadOptions): Promise<LoadResult> {
  const latencies: number[] = [];
  const statuses: Record<number, number> = {};
  let ok = 0;
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      {
        url: opts.url,
        method: opts.method ?? 'GET',
        connections: opts.connections,
        duration: opts.durationS,
        headers: opts.headers,
        body: opts.body,
        requests: opts.requests,
        timeout: 30,
      },
      (err, res) => (err ? reject(err) : resolve(res)),
    );
    instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => {
      latencies.push(ms);
      statuses[status] = (statuses[status] ?? 0) + 1;
      if (status >= 200 && status < 300) ok++;
    });
  });
  latencies.sort((a, b) => a - b);
  return {
    latencies,
    ok,
    errors: latencies.length - ok + result.errors + result.timeouts,
    statuses,
    perSecond: Math.round(latencies.length / opts.durationS),
  };
}

/** Nearest-rank percentile of sorted values. */
export function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const idx = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[idx]!;
}

export const ms = (v: number) => `${v.toFixed(1)} ms`;

/** The machine's 1-minute load average, for the notes: on 2 cores, anything above 2 means other work shared the CPU. */
export const loadNote = () => `1-minute load average when the run ended: ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores.`;
export const p50p95 = (r: LoadResult) => `p50 ${ms(percentile(r.latencies, 50))}, p95 ${ms(percentile(r.latencies, 95))}`;

/** Every answer of several runs against one target as one result: latencies sorted, the rate over all their time. */
export function pooled(runs: LoadResult[], durationS: number): LoadResult {
  const statuses: Record<number, number> = {};
  for (const r of runs) for (const [status, n] of Object.entries(r.statuses)) statuses[Number(status)] = (statuses[Number(status)] ?? 0) + n;
  const latencies = runs.flatMap((r) => r.latencies).sort((a, b) => a - b);
  return {
    latencies,
    ok: runs.reduce((n, r) => n + r.ok, 0),
    errors: runs.reduce((n, r) => n + r.errors, 0),
    statuses,
    perSecond: Math.round(latencies.length / (durationS * runs.length)),
  };
}

/**
 * p95 ÷ floor p95 over rounds in which floor and application took turns: the median of the rounds' ratios, and each
 * round's figures for the notes. The machine's speed drifts within minutes, so each ratio compares runs seconds apart.
 */
export function roundRatios(rounds: { app: LoadResult; floor: LoadResult }[]): { median: number; each: string } {
  const ratios = rounds.map((r) => percentile(r.app.latencies, 95) / percentile(r.floor.latencies, 95));
  const median = [...ratios].sort((a, b) => a - b)[Math.floor((ratios.length - 1) / 2)]!;
  const each = rounds.map((r, i) => `${ratios[i]!.toFixed(2)}× (${ms(percentile(r.app.latencies, 95))} ÷ ${ms(percentile(r.floor.latencies, 95))})`);
  return { median, each: each.join(', ') };
}
