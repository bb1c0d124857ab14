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
    // Two test files at a time (Vitest's default is one fewer than the cores: a single worker on the 2-core machines
    // we use). The browser specs still run one at a time (fileParallelism below): each has its own server, port,
    // database and Chromium, so two at once is safe, but it has not yet been shown faster on 2 cores.
    maxWorkers: 2,
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/unit/server/**/*.test.ts', 'tests/unit/schemas/**/*.test.ts', 'tests/api/**/*.test.ts'],
          setupFiles: ['tests/setup/node.ts'],
          // One migrated and seeded SQLite database per run, copied into each API test file's in-memory database.
          globalSetup: ['tests/setup/sqlite-template.ts'],
          testTimeout: 20_000,
          hookTimeout: 30_000,
        },
      },
      {
        // The API tests again on PostgreSQL: `npm run test:pg` (scripts/with-postgres.sh sets DATABASE_URL).
        // Each test file gets a database of its own on that server (tests/setup/test-database.ts).
        resolve: { alias },
        test: {
          name: 'api-pg',
          environment: 'node',
          include: ['tests/api/**/*.test.ts'],
          // SQLite's alone: copying and restoring its file (PostgreSQL uses pg_dump), and three migration tests that
          // build pre-upgrade SQLite files row by row (tests/api/migrations.api.test.ts covers both databases).
          // Also left out: files that never open the database under test, so a second pass would repeat the same
          // proof on the same SQLite files: the production start-up and create-admin commands (child processes on a
          // SQLite file of their own; DATABASE_URL is removed from their environment), the request path over its
          // own SQLite file, and the FHIR bundles checked against the published schema (no database at all).
          exclude: [
            'tests/api/backup-restore.api.test.ts',
            'tests/api/approvals-migration.api.test.ts',
            'tests/api/exclusion-migration.api.test.ts',
            'tests/api/notice-migration.api.test.ts',
            'tests/api/production-start.api.test.ts',
            'tests/api/create-admin-command.api.test.ts',
            'tests/api/request-path.api.test.ts',
            'tests/api/fhir-conformance.api.test.ts',
          ],
          setupFiles: ['tests/setup/node.ts'],
          env: { CRISTAE_TEST_DATABASE: 'postgres' },
          globalSetup: ['tests/setup/postgres-template.ts'],
          testTimeout: 30_000,
          hookTimeout: 120_000,
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
          // Page tests fed by the real app in-process (tests/setup/real-app-fetch.ts) copy the same seeded database.
          globalSetup: ['tests/setup/sqlite-template.ts'],
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          environment: 'node',
          include: ['tests/e2e/**/*.spec.ts'],
          // The real server seeds one database per run; each spec's server starts on a copy of it.
          globalSetup: ['tests/e2e/support/template.ts'],
          testTimeout: 120_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
