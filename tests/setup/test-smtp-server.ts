import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';

export type SmtpReply = { code: number; text: string };
export type TestSmtpServer = {
  port: number;
  /** Raw text of every message accepted, in order. */
  received: string[];
  /** How RCPT TO is answered from now on: a reply to refuse with (451 busy, 550 refused), or null to accept. */
  answer: (rule: ((recipient: string) => SmtpReply | null) | SmtpReply | null) => void;
  close: () => Promise<void>;
};

/**
 * A stand-in for a laboratory's own mail server that tests steer: plain SMTP on loopback, no TLS, no sign-in,
 * answering each recipient as the test says. What it accepts is kept in memory, outside Cristae's database.
 */
export async function startTestSmtpServer(): Promise<TestSmtpServer> {
  let rule: (recipient: string) => SmtpReply | null = () => null;
  const received: string[] = [];
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    logger: false,
    onRcptTo(address, _session, callback) {
      const reply = rule(address.address);
      if (!reply) return callback();
      callback(Object.assign(new Error(reply.text), { responseCode: reply.code }));
    },
    onData(stream, _session, callback) {
      let text = '';
      stream.on('data', (c: Buffer) => (text += c.toString()));
      stream.on('end', () => {
        received.push(text);
        callback();
      });
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    port: (server.server.address() as AddressInfo).port,
    received,
    answer: (r) => (rule = typeof r === 'function' ? r : () => r),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
