import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { buildSync } from 'esbuild';
import { SourceMapGenerator } from 'source-map-js';
import { afterAll, describe, expect, it } from 'vitest';
import { sourceMappedStack } from '../../../../server/lib/source-mapped-stack';

/*
 * sourceMappedStack called in this process on stacks printed by a real Node process, with maps written by two
 * independent tools: esbuild (linked maps, `sourceMappingURL` beside the .js) and source-map-js's
 * SourceMapGenerator (mappings placed by hand). Source Map Revision 3 [confirmed]: lines and columns are 0-based in
 * a map; V8 stack frames print them 1-based as `file:line:column` [confirmed: V8 stack trace API], as a file path
 * for CommonJS and a file:// URL for an ES module (Node.js ESM docs [confirmed]).
 * tests/unit/server/ops/source-mapped-stack.test.ts checks the whole error log in a child process.
 */

const dir = fs.realpathSync(fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-map-')));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

/** Bundles a TypeScript file that throws on its line 3, column 9, runs it with Node and returns the printed stack. */
function stackOfCompiled(name: string, format: 'cjs' | 'esm') {
  const entry = path.join(dir, `${name}.ts`);
  fs.writeFileSync(
    entry,
    ['export function explode(): never {', '  // the next line throws', "  throw new Error('boom');", '}', 'try { explode(); } catch (err) { console.log((err as Error).stack); }', ''].join('\n'),
  );
  const outDir = path.join(dir, `out-${name}`);
  fs.mkdirSync(outDir, { recursive: true });
  // An ES module needs "type": "module" to keep the .js extension (Node.js packages docs [confirmed]).
  if (format === 'esm') fs.writeFileSync(path.join(outDir, 'package.json'), '{"type":"module"}');
  const outfile = path.join(outDir, `${name}.js`);
  buildSync({ entryPoints: [entry], bundle: true, format, platform: 'node', outfile, sourcemap: 'linked', logLevel: 'silent' });
  const { stdout } = spawnSync(process.execPath, [outfile], { encoding: 'utf8' });
  return { entry, outfile, stack: stdout.trimEnd() };
}

/**
 * A generated file with a hand-placed map: generated (line 12, col 0) → original 7:4, (line 13, col 0) →
 * original 20:2, (line 13, col 10) → original 21:6, all 0-based; the original source is named by `source`.
 */
function handMapped(name: string, source: string) {
  const file = path.join(dir, `${name}.js`);
  fs.writeFileSync(file, '// generated\n');
  const map = new SourceMapGenerator({ file: `${name}.js` });
  const add = (gl: number, gc: number, ol: number, oc: number) =>
    map.addMapping({ generated: { line: gl + 1, column: gc }, original: { line: ol + 1, column: oc }, source });
  add(11, 0, 6, 4);
  add(12, 0, 19, 2);
  add(12, 10, 20, 6);
  fs.writeFileSync(`${file}.map`, map.toString());
  return file;
}

describe('sourceMappedStack', () => {
  it('when a CommonJS bundle throws, then its frame names the TypeScript file, line and column, and the other lines stay as they were', () => {
    const { entry, outfile, stack } = stackOfCompiled('cjs-boom', 'cjs');
    expect(stack).toContain(`${outfile}:`);
    const mapped = sourceMappedStack(stack);
    expect(mapped).toContain(`at explode (${entry}:3:9)`);
    expect(mapped).not.toContain(`${outfile}:`);
    const before = stack.split('\n');
    const after = mapped.split('\n');
    expect(after).toHaveLength(before.length);
    expect(after[0]).toBe('Error: boom');
    // Node's own frames have no map beside them and are left untouched.
    for (const [i, line] of before.entries()) if (line.includes('node:')) expect(after[i]).toBe(line);
  });

  it('when an ES module throws, then its file:// frame is mapped to the TypeScript path the same way', () => {
    const { entry, outfile, stack } = stackOfCompiled('esm-boom', 'esm');
    expect(stack).toContain(pathToFileURL(outfile).href);
    const mapped = sourceMappedStack(stack);
    expect(mapped).toContain(`at explode (${entry}:3:9)`);
    expect(mapped).not.toContain('file://');
  });

  it('maps 1-based frame positions through the 0-based map, multi-digit lines and columns included', () => {
    const file = handMapped('hand', 'src/original.ts');
    const original = path.join(dir, 'src/original.ts');
    const frames = [`    at one (${file}:12:1)`, `    at two (${file}:13:10)`, `    at three (${file}:13:11)`].join('\n');
    expect(sourceMappedStack(frames).split('\n')).toEqual([
      `    at one (${original}:7:5)`,
      `    at two (${original}:20:3)`,
      `    at three (${original}:21:7)`,
    ]);
  });

  it('when the map names its source as a file:// URL, then the frame shows that file\'s path', () => {
    const target = path.join(dir, 'elsewhere', 'server.ts');
    const file = handMapped('url-source', pathToFileURL(target).href);
    expect(sourceMappedStack(`    at f (${pathToFileURL(file).href}:13:11)`)).toBe(`    at f (${target}:21:7)`);
  });

  it('leaves alone a line that is not a frame, a frame of a file without a map and a position the map does not cover', () => {
    const file = handMapped('edges', 'edges.ts');
    const message = `Error: could not read ${file}:12:1`;
    const unmapped = path.join(dir, 'plain.js');
    fs.writeFileSync(unmapped, '');
    const lines = [message, `    at g (${unmapped}:40:2)`, `    at h (${file}:3:1)`, '    at <anonymous>'];
    expect(sourceMappedStack(lines.join('\n'))).toBe(lines.join('\n'));
  });

  it('reads each map once: a frame of a file already seen is mapped even after its map is gone', () => {
    const file = handMapped('read-once', 'once.ts');
    const frame = `    at k (${file}:12:1)`;
    const expected = `    at k (${path.join(dir, 'once.ts')}:7:5)`;
    expect(sourceMappedStack(frame)).toBe(expected);
    fs.rmSync(`${file}.map`);
    expect(sourceMappedStack(frame)).toBe(expected);
  });
});
