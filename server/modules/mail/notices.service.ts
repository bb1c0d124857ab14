import type { Sequelize } from 'sequelize';
import { logError, logInfo } from '../../lib/log';
import { writeTransaction } from '../../db/write-transaction';
import { getLabProfile } from '../lab-profile/lab-profile.service';
import { insertDelivery, listDeliveries, listOutboxMessages } from './mail.repository';
import type { Mailer } from './mailer';
import type { Outbox } from '@/schemas/report';

export type NoticeKind = 'report_ready' | 'report_corrected';

/** What a notice is about. Deliberately no patient fields: the accession number is the only case identifier. */
export type ReportNotice = {
  kind: NoticeKind;
  reportId: number;
  caseId: number;
  accession: string;
  version: number;
  supersedesVersion: number | null;
  recipient: { id: number; email: string; name: string };
};

export type NoticeDeps = { sequelize: Sequelize; mailer: Mailer; publicOrigin: string };

/** The client path where a clinician finds their reports (src/config/paths.ts myReports). */
const MY_REPORTS_PATH = '/my-reports';

/** Subject and body of a notice: accession number, version and a sign-in link; nothing about the patient. */
export function composeNotice(n: ReportNotice, publicOrigin: string, laboratoryName: string): { subject: string; text: string } {
  const link = `${publicOrigin.replace(/\/$/, '')}${MY_REPORTS_PATH}`;
  const lines =
    n.kind === 'report_ready'
      ? [
          `A signed report is ready for a case you referred to ${laboratoryName}.`,
          '',
          `Accession number: ${n.accession}`,
          `Report version: ${n.version} (final)`,
        ]
      : [
          `A corrected report has been issued for a case you referred to ${laboratoryName}.`,
          '',
          `Accession number: ${n.accession}`,
          `Report version: ${n.version} (corrected; replaces version ${n.supersedesVersion ?? n.version - 1})`,
          '',
          'The earlier version stays readable and is marked as superseded. Please read the corrected report before acting on the earlier one.',
        ];
  const text = [
    `Dear ${n.recipient.name},`,
    '',
    ...lines,
    '',
    'Sign in to Cristae to read and download the report:',
    link,
    '',
    'For confidentiality this message carries no patient details. If you did not refer this case, please tell the laboratory and delete this message.',
    '',
    `${laboratoryName}`,
  ].join('\n');
  const subject =
    n.kind === 'report_ready' ? `Report ready: accession ${n.accession}` : `Corrected report: accession ${n.accession}`;
  return { subject, text };
}

const pending = new Set<Promise<void>>();

/** Resolves when every notice started so far has been sent or recorded as failed (tests, shutdown). */
export async function noticesSettled(): Promise<void> {
  while (pending.size > 0) await Promise.allSettled([...pending]);
}

/**
 * Sends a notice and records the attempt. Called after the signing transaction has committed; it never
 * throws, so a mail problem can neither undo a signature nor fail the director's request.
 */
export function sendReportNotice(deps: NoticeDeps, notice: ReportNotice): Promise<void> {
  const work = (async () => {
    let subject = notice.kind === 'report_ready' ? 'Report ready' : 'Corrected report';
    try {
      const lab = await getLabProfile().catch(() => ({ name: 'the laboratory' }));
      const mail = composeNotice(notice, deps.publicOrigin, lab.name);
      subject = mail.subject;
      const { messageId } = await deps.mailer.send({ to: notice.recipient.email, ...mail });
      await record(deps.sequelize, notice, subject, 'sent', null, messageId);
      logInfo('notice sent', { kind: notice.kind, reportId: notice.reportId });
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      if (deps.mailer.kind === 'none') logInfo('notice not sent', { kind: notice.kind, reportId: notice.reportId, reason: message });
      else logError(err, `sending ${notice.kind} notice for report ${notice.reportId}`);
      await record(deps.sequelize, notice, subject, 'failed', message.slice(0, 2000), null).catch((e: unknown) =>
        logError(e, `recording a failed ${notice.kind} notice`),
      );
    }
  })();
  pending.add(work);
  void work.finally(() => pending.delete(work));
  return work;
}

async function record(
  sequelize: Sequelize,
  n: ReportNotice,
  subject: string,
  status: 'sent' | 'failed',
  error: string | null,
  messageId: string | null,
): Promise<void> {
  await writeTransaction(sequelize, (transaction) =>
    insertDelivery(
      {
        kind: n.kind,
        reportId: n.reportId,
        caseId: n.caseId,
        recipientUserId: n.recipient.id,
        recipient: n.recipient.email,
        subject,
        status,
        error,
        messageId,
        attemptedAt: new Date(),
      },
      transaction,
    ),
  );
}

export async function getOutbox(mailer: Mailer): Promise<Outbox> {
  const [messages, deliveries] = await Promise.all([listOutboxMessages(200), listDeliveries(200)]);
  return { messages, deliveries, localServer: mailer.kind === 'local' };
}
