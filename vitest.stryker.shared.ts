import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const root = path.dirname(fileURLToPath(import.meta.url));

/** What every Stryker configuration's Vitest run shares: the node environment, the '@' alias and the node set-up. */
export function mutationConfig(test: { name: string; include: string[]; testTimeout: number; hookTimeout?: number }) {
  return defineConfig({
    resolve: { alias: { '@': path.resolve(root, 'src') } },
    test: { environment: 'node', setupFiles: ['tests/setup/node.ts'], ...test },
  });
}
