import type { Transporter } from 'nodemailer';
import type { AppConfig } from '../../config';
import { PermanentMailError } from './notice-schedule';

export type OutgoingMail = { to: string; subject: string; text: string };

/** What the notices need from a mail transport; nodemailer behind it, or nothing at all. */
export type Mailer = {
  /** Where mail goes, for the admin page: 'local' (the SMTP stand-in), 'smtp' (a real server) or 'none'. */
  readonly kind: 'local' | 'smtp' | 'none';
  readonly from: string;
  send(mail: OutgoingMail): Promise<{ messageId: string }>;
  close(): void;
};

/** A mailer that sends nothing: every try fails for good with a plain reason, which the outbox shows. */
export function createDisabledMailer(from: string): Mailer {
  return {
    kind: 'none',
    from,
    send: () =>
      Promise.reject(new PermanentMailError('No mail server is configured (set SMTP_HOST, or run with the local stand-in)')),
    close: () => {},
  };
}

/**
 * nodemailer over SMTP: the production server from config.mail.smtp, or the local stand-in on `localPort`.
 * The stand-in speaks plain SMTP on loopback, so TLS is not attempted (ignoreTLS); a real server gets
 * STARTTLS as it offers it, or implicit TLS on port 465.
 */
export function createSmtpMailer(mail: AppConfig['mail'], localPort?: number): Mailer {
  const options =
    localPort !== undefined
      ? { host: '127.0.0.1', port: localPort, secure: false, ignoreTLS: true }
      : mail.smtp
        ? {
            host: mail.smtp.host,
            port: mail.smtp.port,
            secure: mail.smtp.port === 465,
            ...(mail.smtp.user ? { auth: { user: mail.smtp.user, pass: mail.smtp.pass ?? '' } } : {}),
          }
        : null;
  if (!options) return createDisabledMailer(mail.from);
  // nodemailer loads with the first message sent, not at start-up.
  let transport: Promise<Transporter> | null = null;
  const open = () =>
    (transport ??= import('nodemailer').then(({ default: nodemailer }) =>
      nodemailer.createTransport({
        ...options,
        connectionTimeout: 10_000,
        greetingTimeout: 10_000,
        socketTimeout: 20_000,
      }),
    ));
  return {
    kind: localPort !== undefined ? 'local' : 'smtp',
    from: mail.from,
    send: async ({ to, subject, text }) => {
      const info = await (await open()).sendMail({ from: mail.from, to, subject, text });
      return { messageId: info.messageId };
    },
    close: () => void transport?.then((t) => t.close()),
  };
}
