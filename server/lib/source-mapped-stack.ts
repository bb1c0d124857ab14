import fs from 'node:fs';
import { SourceMap } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/*
 * Stack traces of the compiled server point at dist/server/*.js. Node's --enable-source-maps would map every
 * stack trace, and Sequelize reads a stack on every query, so the compiled server runs without it and maps only
 * the stacks it logs: each frame in a file with a sibling .map is rewritten to the TypeScript file and line.
 */

const maps = new Map<string, SourceMap | null>();

function mapFor(file: string): SourceMap | null {
  if (!maps.has(file)) {
    let map: SourceMap | null = null;
    try {
      map = new SourceMap(JSON.parse(fs.readFileSync(`${file}.map`, 'utf8')) as never);
    } catch {
      /* no map beside this file: leave its frames as they are */
    }
    maps.set(file, map);
  }
  return maps.get(file)!;
}

const FRAME = /(file:\/\/[^\s()]+?\.js|\/[^\s()]+?\.js):(\d+):(\d+)/;

/** The stack with every frame that has a source map pointing at its original file, line and column. */
export function sourceMappedStack(stack: string): string {
  return stack
    .split('\n')
    .map((line) => {
      const m = FRAME.exec(line);
      if (!m || !line.trimStart().startsWith('at ')) return line;
      const file = m[1]!.startsWith('file://') ? fileURLToPath(m[1]!) : m[1]!;
      const entry = mapFor(file)?.findEntry(Number(m[2]) - 1, Number(m[3]) - 1) as
        | { originalSource?: string; originalLine?: number; originalColumn?: number }
        | undefined;
      if (!entry?.originalSource || entry.originalLine === undefined) return line;
      const source = entry.originalSource.startsWith('file://')
        ? fileURLToPath(entry.originalSource)
        : path.resolve(path.dirname(file), entry.originalSource);
      return line.replace(m[0], `${source}:${entry.originalLine + 1}:${(entry.originalColumn ?? 0) + 1}`);
    })
    .join('\n');
}
