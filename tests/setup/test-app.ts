import type { Express } from 'express';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { createApp, type AppOptions } from '../../server/app';
import { loadConfig } from '../../server/config';
import { demoAccounts } from '../../server/db/seed/demo';
import { DEMO_PASSWORD, prepareDemoDatabase } from './demo-database';
import { openTestDatabase } from './test-database';
import type { Role } from '@/schemas/common';

export const ORIGIN = 'http://localhost:3000';
export { DEMO_PASSWORD };

export type TestApp = {
  app: Express;
  sequelize: Sequelize;
  /** A supertest agent that sends the app's own Origin on every request, like the browser does. */
  agent: () => ReturnType<typeof sameOriginAgent>;
  /** An agent already signed in as the demo account of that role. */
  signedIn: (role: Role | 'clinician2' | 'director2') => Promise<ReturnType<typeof sameOriginAgent>>;
  /** Another app over the same database (models are bound to one database per test file). */
  withOptions: (overrides: Partial<AppOptions>) => Express;
  close: () => Promise<void>;
};

function sameOriginAgent(app: Express) {
  const agent = request.agent(app);
  agent.set('Origin', ORIGIN);
  return agent;
}

/**
 * A fresh database with migrations and the demo seed, and an app on top of it: in-memory SQLite, or a database
 * of its own on the PostgreSQL test server (tests/setup/test-database.ts), dropped by close(). The database is a
 * copy of the run's seeded template; the migrations and the seed still run on it and find nothing to do.
 */
export async function makeTestApp(overrides: Partial<AppOptions> = {}): Promise<TestApp> {
  const db = await openTestDatabase({ seeded: true });
  const sequelize = db.sequelize;
  await prepareDemoDatabase(sequelize);
  const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD });
  const app = createApp({ sequelize, config, loginAttemptsPerWindow: 1000, ...overrides });
  const withOptions = (more: Partial<AppOptions>) => createApp({ sequelize, config, loginAttemptsPerWindow: 1000, ...overrides, ...more });
  return {
    app,
    sequelize,
    agent: () => sameOriginAgent(app),
    signedIn: async (role) => {
      const email =
        role === 'clinician2' || role === 'director2' ? `${role}@demo.test` : demoAccounts.find((a) => a.role === role)!.email;
      const agent = sameOriginAgent(app);
      const res = await agent.post('/api/auth/login').send({ email, password: DEMO_PASSWORD });
      if (res.status !== 200) throw new Error(`sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
      return agent;
    },
    withOptions,
    close: db.drop,
  };
}

export async function countRows(sequelize: Sequelize, table: string): Promise<number> {
  const [rows] = await sequelize.query(`SELECT COUNT(*) AS n FROM "${table}"`);
  return Number((rows as { n: number | string }[])[0]!.n); // PostgreSQL answers a bigint, as a string
}
