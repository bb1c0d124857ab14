import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApp } from './app';
import { initModels } from './db/models';
import { migrate } from './db/migrate';
import { loadConfigOrExit, prepareAccounts, warnAboutDeployment } from './ops/start-up';
import { ensureDefaultDefinitions } from './modules/assay-definitions/assay-definitions.service';
import { listenForForgets } from './db/forget-everywhere';
import { isPostgres, openDatabase, withStartupLock } from './db/sequelize';
import { logError, logInfo } from './lib/log';
import { startMail } from './modules/mail/mail-setup';

/** The project folder: the nearest one above this file with a package.json (server/ from sources, dist/server/ compiled). */
function projectRoot(): string {
  let dir = path.dirname(fileURLToPath(import.meta.url));
  while (!fs.existsSync(path.join(dir, 'package.json')) && path.dirname(dir) !== dir) dir = path.dirname(dir);
  return dir;
}
const root = projectRoot();

async function main(): Promise<void> {
  const config = loadConfigOrExit();
  warnAboutDeployment(config);
  const sequelize = await openDatabase(config.databaseUrl ?? config.databasePath, { poolMax: config.databasePoolMax });
  initModels(sequelize);
  // Several servers may share a PostgreSQL database: each hears the others' sign-outs and account changes.
  const stopListening = isPostgres(sequelize) ? await listenForForgets(sequelize) : async () => undefined;
  // One process at a time (PostgreSQL may have several application servers starting together).
  const applied = await withStartupLock(sequelize, async () => {
    const done = await migrate(sequelize);
    await ensureDefaultDefinitions(sequelize);
    return done;
  });
  if (applied.length) logInfo('migrations applied', { applied });
  const mail = await startMail(sequelize, config);
  const notices = { sequelize, mailer: mail.mailer, publicOrigin: config.publicOrigin };
  await withStartupLock(sequelize, () => prepareAccounts(sequelize, config, notices));

  const app = createApp({ sequelize, config, clientDir: path.join(root, 'dist', 'client'), expireSessions: true, mailer: mail.mailer });
  const server = app.listen(config.port, () => {
    logInfo(`Cristae is serving on http://localhost:${config.port}`);
    // The first report after a start should be as quick as the rest (bench: first PDF).
    void import('./domain/report-pdf/warm-up')
      .then(({ warmUpReportRendering }) => warmUpReportRendering())
      .catch((err: unknown) => logError(err, 'warming up report rendering'));
  });

  const stop = (signal: string) => {
    logInfo('shutting down', { signal });
    server.close(() => {
      void mail
        .close()
        .catch((err: unknown) => logError(err, 'closing mail'))
        .then(() => stopListening())
        .then(() => sequelize.close())
        .catch((err: unknown) => logError(err, 'closing the database'))
        .finally(() => process.exit(0));
    });
    setTimeout(() => process.exit(0), 5000).unref();
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
}

process.on('unhandledRejection', (err) => {
  logError(err, 'unhandledRejection');
  process.exit(1);
});
process.on('uncaughtException', (err) => {
  logError(err, 'uncaughtException');
  process.exit(1);
});

void main();
