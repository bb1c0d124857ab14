import type { Sequelize } from 'sequelize';
import { ConfigError, loadConfig, type AppConfig } from '../config';
import { seedDemoIfEmpty } from '../db/seed/demo';
import { AppError } from '../lib/errors';
import { logInfo, logWarn } from '../lib/log';
import type { NoticeDeps } from '../modules/mail/notices.service';
import { countActiveAdministrators, ensureFirstAdministrator } from './first-admin';

/** Prints one line per problem, each naming its variable, and ends the process with status 1. */
export function exitWithProblems(problems: string[]): never {
  const heading = `Cristae cannot start: ${problems.length === 1 ? 'a problem' : `${problems.length} problems`} with the environment`;
  console.error([heading, ...problems.map((p) => `  - ${p}`)].join('\n'));
  process.exit(1);
}

/** The configuration, or a plain list of what is wrong with it and a non-zero exit. */
export function loadConfigOrExit(env: NodeJS.ProcessEnv = process.env): AppConfig {
  try {
    return loadConfig(env);
  } catch (err) {
    if (err instanceof ConfigError) exitWithProblems(err.problems);
    throw err;
  }
}

/** Settings that start but would leave a laboratory deployment broken or exposed. */
export function warnAboutDeployment(config: AppConfig, env: NodeJS.ProcessEnv = process.env): void {
  if (config.env !== 'production') return;
  if (config.trustProxy === false) {
    logWarn('TRUST_PROXY is off: the session cookie is Secure and is only set for HTTPS requests; behind a TLS proxy set TRUST_PROXY (see README, "Running it for a laboratory")');
  }
  if (!env.APP_ORIGIN) logWarn('APP_ORIGIN is not set: browsers reaching the app by its public https:// address cannot make changes, and e-mail links point to localhost');
  if (config.seedDemo) logWarn('SEED_DEMO=1: the invented demo laboratory, accounts and patients are seeded into an empty production database');
}

/**
 * Accounts on start-up: the demo laboratory where the configuration allows it (never in production unless
 * SEED_DEMO=1), then the first administrator from BOOTSTRAP_ADMIN_EMAIL/PASSWORD when none is active.
 */
export async function prepareAccounts(sequelize: Sequelize, config: AppConfig, notices: NoticeDeps | null): Promise<void> {
  if (config.seedDemo && (await seedDemoIfEmpty(sequelize, config.demoPassword, notices))) {
    logInfo('demo data seeded (invented, fictitious)');
  }
  if (config.bootstrapAdmin) {
    try {
      const created = await ensureFirstAdministrator(sequelize, config.bootstrapAdmin);
      if (created) logInfo('first administrator created from BOOTSTRAP_ADMIN_EMAIL', { email: created.email });
    } catch (err) {
      if (err instanceof AppError) exitWithProblems([`BOOTSTRAP_ADMIN_EMAIL: ${err.message}; choose another address`]);
      throw err;
    }
  }
  if (config.env === 'production' && (await countActiveAdministrators()) === 0) {
    logWarn('no active administrator: set BOOTSTRAP_ADMIN_EMAIL and BOOTSTRAP_ADMIN_PASSWORD, or run `npm run create-admin -- --email ...`');
  }
}
