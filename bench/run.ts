import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { BenchResult } from './types';

/*
 * Runs every benchmark in turn and records the figures in docs/performance.md. Speed goals live here,
 * never in timed tests. `npm run bench -- engine` runs only the benchmarks whose name contains "engine", and
 * replaces only their sections of docs/performance.md (each section starts with a `<!-- bench:name -->` mark).
 */
const benches: { name: string; load: () => Promise<{ default: () => Promise<BenchResult> }> }[] = [
  { name: 'engine-plate', load: () => import('./engine-plate') },
  { name: 'request-path', load: () => import('./request-path') },
  { name: 'write-path', load: () => import('./write-path') },
  { name: 'start-up', load: () => import('./start-up') },
];
for (const extra of ['cases-list', 'cohort-search', 'postgres']) {
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
    'Measuring on a shared machine: with the kernel\'s automatic process groups on (`/proc/sys/kernel/sched_autogroup_enabled`',
    '= 1, the default on many distributions), `nice` only ranks processes within one terminal session, so a niced job started',
    'elsewhere still takes its full share of the cores from a benchmark. Turn it off (`echo 0 >',
    '/proc/sys/kernel/sched_autogroup_enabled`, as root) or run other work with `chrt -i 0` (idle class) before measuring.',
    '',
    `Last run: ${new Date().toISOString()} on ${machine}.`,
    '',
  ];
  const sections = new Map<string, string[]>();
  for (const { name, result, error } of results) {
    const section: string[] = [];
    sections.set(name, section);
    section.push(`<!-- bench:${name} -->`, `## ${result?.title ?? name}`, '');
    if (!result) {
      section.push(`Failed: ${error}`, '');
      continue;
    }
    section.push('| metric | value | goal | met |', '|---|---|---|---|');
    for (const r of result.rows) section.push(`| ${r.metric} | ${r.value} | ${r.goal} | ${r.met ? 'yes' : '**no**'} |`);
    section.push('');
    if (result.notes) section.push(result.notes, '');
    if (only) section.push(`Run alone (\`npm run bench -- ${process.argv.slice(2).join(' ')}\`) at ${new Date().toISOString()} on ${machine}.`, '');
  }
  const out = path.join(import.meta.dirname, '..', 'docs', 'performance.md');
  if (only && fs.existsSync(out)) {
    // A partial run replaces its own sections (each from its mark to the next mark) and
    // appends the ones the page does not have yet; every other figure stays as the last full run wrote it.
    let text = fs.readFileSync(out, 'utf8');
    for (const [name, section] of sections) {
      const mark = `<!-- bench:${name} -->`;
      const start = text.indexOf(mark);
      const body = `${section.join('\n')}\n`;
      if (start < 0) {
        text = `${text.trimEnd()}\n\n${body}`;
        continue;
      }
      const next = text.indexOf('<!-- bench:', start + mark.length);
      text = text.slice(0, start) + body + (next < 0 ? '' : text.slice(next));
    }
    fs.writeFileSync(out, text);
    console.log(`updated ${[...sections.keys()].join(', ')} in ${path.relative(process.cwd(), out)}`);
    return;
  }
  for (const section of sections.values()) lines.push(...section);
  fs.writeFileSync(out, lines.join('\n'));
  console.log(`wrote ${path.relative(process.cwd(), out)}`);
}

void main();
