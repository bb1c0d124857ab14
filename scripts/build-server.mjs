// Compiles the server and the operations commands to dist/server with esbuild (npm run build:server):
// one ESM bundle per entry point plus shared chunks, packages left in node_modules, the `@/` alias resolved
// from tsconfig.json, and linked source maps so error logs can point at the TypeScript lines.
import { rmSync } from 'node:fs';
import path from 'node:path';
import { build } from 'esbuild';

const root = path.resolve(import.meta.dirname, '..');
const outdir = path.join(root, 'dist', 'server');

// --clean empties the folder first (npm run build); the operations commands rebuild in place, which leaves a
// running server's files as they were when nothing changed (esbuild's output is deterministic).
if (process.argv.includes('--clean')) rmSync(outdir, { recursive: true, force: true });
const started = Date.now();
await build({
  absWorkingDir: root,
  entryPoints: {
    index: 'server/index.ts',
    backup: 'scripts/backup.ts',
    restore: 'scripts/restore.ts',
    'create-admin': 'scripts/create-admin.ts',
  },
  outdir,
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  packages: 'external',
  tsconfig: 'tsconfig.json',
  sourcemap: 'linked',
  sourcesContent: false,
  chunkNames: 'chunks/[name]-[hash]',
  logLevel: 'warning',
});
if (!process.argv.includes('--quiet')) console.log(`server compiled to ${path.relative(process.cwd(), outdir)} in ${Date.now() - started} ms`);
