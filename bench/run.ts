import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { BenchResult } from './types';

/*
 * Runs every benchmark in turn and records the figures in docs/performance.md. Speed goals live here,
 * never in timed tests. `npm run bench -- engine` runs only the benchmarks whose name contains "engine".
 */
const benches: { name: string; load: () => Promise<{ default: () => Promise<BenchResult> }> }[] = [
  { name: 'engine-plate', load: () => import('./engine-plate') },
  { name: 'request-path', load: () => import('./request-path') },
  { name: 'write-path', load: () => import('./write-path') },
  { name: 'start-up', load: () => import('./start-up') },
];
for (const extra of ['cases-list', 'postgres']) {
  if (fs.existsSync(path.join(import.meta.dirname, `${extra}.ts`))) benches.push({ name: extra, load: () => import(`./${extra}.ts`) });
}

async function main() {
  const only = process.argv[2];
  const results: { name: string; result: BenchResult | null; error?: string }[] = [];
  for (const b of benches.filter((x) => !only || x.name.includes(only))) {
    process.stdout.write(`running ${b.name} … `);
    try {
      const result = await (await b.load()).default();
      results.push({ name: b.name, result });
      console.log(result.rows.every((r) => r.met) ? 'goals met' : 'GOAL MISSED');
      for (const r of result.rows) console.log(`  ${r.met ? ' ' : '!'} ${r.metric}: ${r.value} (goal ${r.goal})`);
    } catch (err) {
      results.push({ name: b.name, result: null, error: err instanceof Error ? err.message : String(err) });
      console.log(`failed: ${String(err)}`);
    }
  }
  const machine = `${os.cpus().length} cores (${os.cpus()[0]?.model ?? 'unknown'}), ${(os.totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}, ${os.platform()} ${os.release()}`;
  const lines = [
    '# Performance',
    '',
    'Written by `npm run bench` (bench/run.ts). Goals are met here, in benchmarks, never in timed tests.',
    '',
    `Last run: ${new Date().toISOString()} on ${machine}.`,
    '',
  ];
  for (const { name, result, error } of results) {
    lines.push(`## ${result?.title ?? name}`, '');
    if (!result) {
      lines.push(`Failed: ${error}`, '');
      continue;
    }
    lines.push('| metric | value | goal | met |', '|---|---|---|---|');
    for (const r of result.rows) lines.push(`| ${r.metric} | ${r.value} | ${r.goal} | ${r.met ? 'yes' : '**no**'} |`);
    lines.push('');
    if (result.notes) lines.push(result.notes, '');
  }
  const out = path.join(import.meta.dirname, '..', 'docs', 'performance.md');
  if (only && fs.existsSync(out)) {
    console.log('(a partial run does not rewrite docs/performance.md)');
    return;
  }
  fs.writeFileSync(out, lines.join('\n'));
  console.log(`wrote ${path.relative(process.cwd(), out)}`);
}

void main();
