import path from 'node:path';
import { fileURLToPath } from 'node:url';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

const root = path.dirname(fileURLToPath(import.meta.url));
const alias = { '@': path.resolve(root, 'src') };

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: { alias },
  build: { outDir: 'dist/client', emptyOutDir: true, chunkSizeWarningLimit: 600 },
  server: { proxy: { '/api': 'http://localhost:3000' } },
  test: {
    reporters: ['default', './tests/setup/plain-summary-reporter.ts'],
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/unit/server/**/*.test.ts', 'tests/unit/schemas/**/*.test.ts', 'tests/api/**/*.test.ts'],
          setupFiles: ['tests/setup/node.ts'],
          testTimeout: 20_000,
          hookTimeout: 30_000,
        },
      },
      {
        plugins: [react()],
        resolve: { alias },
        test: {
          name: 'jsdom',
          environment: 'jsdom',
          include: ['tests/ui/**/*.test.tsx', 'tests/unit/client/**/*.test.ts?(x)'],
          setupFiles: ['tests/setup/jsdom.ts'],
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          environment: 'node',
          include: ['tests/e2e/**/*.spec.ts'],
          testTimeout: 120_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
