import type { Sequelize } from 'sequelize';
import { z } from 'zod';
import type { AppConfig } from '../../config';
import { logError, logInfo } from '../../lib/log';
import { startLocalSmtpServer, type LocalSmtpServer } from './local-smtp';
import { createDisabledMailer, createSmtpMailer, type Mailer } from './mailer';
import { DEFAULT_LEASE_MS, startNoticeWorker } from './notice-worker';

export type MailSetup = { mailer: Mailer; localServer: LocalSmtpServer | null; close: () => Promise<void> };

const ms = z.coerce.number().int().min(0).max(24 * 60 * 60_000);
const workerEnvSchema = z.object({
  NOTICE_POLL_MS: ms.min(100).default(5000),
  NOTICE_LEASE_MS: ms.min(1000).default(DEFAULT_LEASE_MS),
  NOTICE_WORKER_DELAY_MS: ms.default(0),
});

/**
 * The notice worker's timing (docs/notices.md): NOTICE_POLL_MS between looks at the outbox, NOTICE_LEASE_MS
 * before a try cut short by a stop is taken up again, NOTICE_WORKER_DELAY_MS before the first look.
 */
export function noticeWorkerSettings(env: NodeJS.ProcessEnv = process.env) {
  const parsed = workerEnvSchema.safeParse(env);
  if (!parsed.success) {
    throw new Error(`Invalid environment: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  const e = parsed.data;
  return { pollMs: e.NOTICE_POLL_MS, leaseMs: e.NOTICE_LEASE_MS, startDelayMs: e.NOTICE_WORKER_DELAY_MS };
}

async function openMailer(sequelize: Sequelize, config: AppConfig): Promise<{ mailer: Mailer; localServer: LocalSmtpServer | null }> {
  if (config.mail.smtp) {
    logInfo('mail goes through SMTP', { host: config.mail.smtp.host, port: config.mail.smtp.port });
    return { mailer: createSmtpMailer(config.mail), localServer: null };
  }
  if (config.env === 'production') {
    logInfo('no SMTP_HOST set: report notices will be recorded as not sent');
    return { mailer: createDisabledMailer(config.mail.from), localServer: null };
  }
  let localServer: LocalSmtpServer;
  try {
    localServer = await startLocalSmtpServer(sequelize, config.mail.localSmtpPort);
  } catch (err) {
    // Another process holds the port (two dev servers, say): take any free one rather than not start.
    logError(err, `local SMTP stand-in could not listen on ${config.mail.localSmtpPort}; using a free port`);
    localServer = await startLocalSmtpServer(sequelize, 0);
  }
  logInfo('local SMTP stand-in is receiving mail', { port: localServer.port });
  return { mailer: createSmtpMailer(config.mail, localServer.port), localServer };
}

/**
 * Production sends through the SMTP server named by SMTP_HOST/SMTP_PORT/SMTP_USER/SMTP_PASS. Without one,
 * development and tests start the local stand-in on LOCAL_SMTP_PORT (0 = any free port) and read its mail on
 * the "Sent e-mail" page; production without SMTP_HOST sends nothing and marks each notice as not sent.
 * Either way the notice worker starts here and delivers the outbox until `close()`.
 */
export async function startMail(sequelize: Sequelize, config: AppConfig, env: NodeJS.ProcessEnv = process.env): Promise<MailSetup> {
  const settings = noticeWorkerSettings(env);
  const { mailer, localServer } = await openMailer(sequelize, config);
  const worker = startNoticeWorker({ sequelize, mailer, ...settings });
  return {
    mailer,
    localServer,
    close: async () => {
      await worker.stop();
      mailer.close();
      await localServer?.close();
    },
  };
}
