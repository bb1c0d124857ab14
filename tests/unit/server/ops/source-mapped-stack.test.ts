import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { buildSync } from 'esbuild';
import { afterAll, describe, expect, it } from 'vitest';

// The compiled server runs without --enable-source-maps; its error log maps stacks itself. The map here is
// written by esbuild (Source Map Revision 3 [confirmed]), independent of the code under test.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-stack-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('source-mapped error logs of the compiled server', () => {
  it('when compiled code throws and the error is logged, then the stack names the TypeScript file and line', () => {
    const entry = path.join(dir, 'boom.ts');
    const logModule = path.resolve(import.meta.dirname, '../../../../server/lib/log.ts');
    fs.writeFileSync(
      entry,
      [
        `import { logError } from ${JSON.stringify(logModule)};`,
        'function explode(): never {',
        "  throw new Error('boom');",
        '}',
        "try { explode(); } catch (err) { logError(err, 'test'); }",
        '',
      ].join('\n'),
    );
    const outfile = path.join(dir, 'out', 'boom.js');
    buildSync({ entryPoints: [entry], bundle: true, format: 'esm', platform: 'node', outfile, sourcemap: 'linked', logLevel: 'silent' });
    const { stderr } = spawnSync(process.execPath, [outfile], { encoding: 'utf8' });
    const logged = JSON.parse(
      stderr
        .split('\n')
        .find((l) => l.includes('"level":"error"'))!,
    ) as { stack: string };
    expect(logged.stack).toContain(`at explode (${entry}:3:9)`);
    expect(logged.stack).not.toContain('boom.js');
  });
});
