import type { Sequelize } from 'sequelize';
import type { AppConfig } from '../../config';
import { logError, logInfo } from '../../lib/log';
import { startLocalSmtpServer, type LocalSmtpServer } from './local-smtp';
import { createDisabledMailer, createSmtpMailer, type Mailer } from './mailer';
import { noticesSettled } from './notices.service';

export type MailSetup = { mailer: Mailer; localServer: LocalSmtpServer | null; close: () => Promise<void> };

/**
 * Production sends through the SMTP server named by SMTP_HOST/SMTP_PORT/SMTP_USER/SMTP_PASS. Without one,
 * development and tests start the local stand-in on LOCAL_SMTP_PORT (0 = any free port) and read its mail on
 * the "Sent e-mail" page; production without SMTP_HOST sends nothing and records each notice as not sent.
 */
export async function startMail(sequelize: Sequelize, config: AppConfig): Promise<MailSetup> {
  if (config.mail.smtp) {
    const mailer = createSmtpMailer(config.mail);
    logInfo('mail goes through SMTP', { host: config.mail.smtp.host, port: config.mail.smtp.port });
    return { mailer, localServer: null, close: async () => mailer.close() };
  }
  if (config.env === 'production') {
    logInfo('no SMTP_HOST set: report notices will be recorded as not sent');
    const mailer = createDisabledMailer(config.mail.from);
    return { mailer, localServer: null, close: async () => {} };
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
  const mailer = createSmtpMailer(config.mail, localServer.port);
  return {
    mailer,
    localServer,
    close: async () => {
      await noticesSettled();
      mailer.close();
      await localServer.close();
    },
  };
}
