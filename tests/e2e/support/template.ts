import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { DATABASE_FILE, E2E_TEMPLATE_KEY, spawnServer } from './server';

/**
 * Global set-up of the "e2e" project: the real server starts once on an empty database, migrates and seeds it as
 * any first start does, and stops; each spec's server then starts on a copy of that database (startServer)
 * instead of seeding its own, which takes seconds. Its mail worker is held back, so the seeded report notices
 * are still waiting in the copy's outbox for each spec's own server to deliver. Removed at the end of the run.
 */
export default async function setup(project: TestProject): Promise<() => void> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-e2e-template-'));
  const remove = () => fs.rmSync(dataDir, { recursive: true, force: true });
  try {
    // A failure here stops every spec, so the first start (which also migrates and seeds) gets more time.
    const server = await spawnServer({ NOTICE_WORKER_DELAY_MS: String(24 * 60 * 60_000) }, dataDir, 300);
    await server.stop();
  } catch (err) {
    remove();
    throw err;
  }
  project.provide(E2E_TEMPLATE_KEY, path.join(dataDir, DATABASE_FILE));
  return remove;
}
