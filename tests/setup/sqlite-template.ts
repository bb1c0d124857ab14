import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { openDatabase } from '../../server/db/sequelize';
import { copySqliteDatabase, prepareDemoDatabase, SQLITE_TEMPLATE_KEY } from './demo-database';

type Shared = { file: Promise<string>; dir: string; users: number };
const holder = globalThis as { cristaeSqliteTemplate?: Shared };

/** How long making the template may take before the run fails (it takes seconds). */
const DEADLINE_MS = 180_000;

async function makeTemplate(file: string): Promise<string> {
  const sequelize = await openDatabase(':memory:');
  try {
    await prepareDemoDatabase(sequelize);
    await copySqliteDatabase(sequelize, file, 'to-file');
  } finally {
    await sequelize.close();
  }
  return file;
}

/**
 * Fails when `work` has not settled within DEADLINE_MS. The timer also keeps Vitest's main process alive: a
 * promise that never settles (a database call that never answers) would otherwise let the event loop empty and
 * the process end with status 0 before any test ran.
 */
function withDeadline<T>(work: Promise<T>, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not finish within ${DEADLINE_MS / 1000} s`)), DEADLINE_MS);
  });
  return Promise.race([work, late]).finally(() => clearTimeout(timer));
}

/**
 * Global set-up of the "node" and "jsdom" projects: one in-memory SQLite database migrated and seeded exactly
 * as makeTestApp() would, written once per run to a file, which every test file's in-memory database is then
 * copied from with SQLite's backup API (tests/setup/test-database.ts), instead of migrating and seeding its own
 * (the demo seed alone takes seconds). Both projects share the one file; the last teardown removes it.
 */
export default async function setup(project: TestProject): Promise<() => void> {
  if (!holder.cristaeSqliteTemplate) {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-template-'));
    const file = withDeadline(makeTemplate(path.join(dir, 'seeded.sqlite')), 'migrating and seeding the SQLite template');
    holder.cristaeSqliteTemplate = { dir, users: 0, file };
  }
  const shared = holder.cristaeSqliteTemplate;
  let file: string;
  try {
    file = await shared.file;
  } catch (err) {
    fs.rmSync(shared.dir, { recursive: true, force: true });
    throw err;
  }
  shared.users += 1;
  project.provide(SQLITE_TEMPLATE_KEY, file);
  return () => {
    shared.users -= 1;
    if (shared.users > 0) return;
    fs.rmSync(shared.dir, { recursive: true, force: true });
    delete holder.cristaeSqliteTemplate;
  };
}
