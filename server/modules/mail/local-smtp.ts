import type { AddressInfo } from 'node:net';
import type { Sequelize } from 'sequelize';
import type { AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { logError } from '../../lib/log';
import { insertOutboxMessage } from './mail.repository';

export type LocalSmtpServer = { port: number; close: () => Promise<void> };

function addressText(a: AddressObject | AddressObject[] | undefined): string | null {
  if (!a) return null;
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ') || null;
}

/**
 * The development and test stand-in for a mail server: plain SMTP on loopback, no authentication, no TLS.
 * Each message it receives is parsed and kept in the outbox table, which the "Sent e-mail" page lists.
 * `port` 0 takes any free port (tests); the port actually bound is returned.
 */
export async function startLocalSmtpServer(sequelize: Sequelize, port: number): Promise<LocalSmtpServer> {
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    logger: false,
    banner: 'Cristae local mail stand-in',
    closeTimeout: 2000,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      // mailparser loads with the first message received, not at start-up.
      import('mailparser')
        .then(({ simpleParser }) => simpleParser(stream))
        .then((parsed) =>
          insertOutboxMessage(sequelize, {
            messageId: parsed.messageId ?? null,
            fromAddress: addressText(parsed.from),
            toAddress: addressText(parsed.to) ?? session.envelope.rcptTo.map((r) => r.address).join(', '),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            receivedAt: new Date(),
          }),
        )
        .then(
          () => callback(),
          (err: unknown) => {
            logError(err, 'local SMTP stand-in: storing a received message');
            callback(err instanceof Error ? err : new Error(String(err)));
          },
        );
    },
  });
  server.on('error', (err) => logError(err, 'local SMTP stand-in'));
  await new Promise<void>((resolve, reject) => {
    server.server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.server.off('error', reject);
      resolve();
    });
  });
  const bound = (server.server.address() as AddressInfo).port;
  return { port: bound, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}
