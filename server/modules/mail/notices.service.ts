import type { Sequelize, Transaction } from 'sequelize';
import type { MailDelivery, Outbox } from '@/schemas/report';
import type { User } from '@/schemas/user';
import { writeTransaction } from '../../db/write-transaction';
import { conflict, invalidState, notFound } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { getLabProfile } from '../lab-profile/lab-profile.service';
import { accessionOf, findNotice, insertNotice, listNotices, listOutboxMessages, toDelivery, updateNotice } from './mail.repository';
import type { Mailer } from './mailer';
import { DEFAULT_RETRY_SCHEDULE, retryDelays, type RetrySchedule } from './notice-schedule';
import { nudgeNoticeWorkers } from './notice-worker';

export type NoticeKind = 'report_ready' | 'report_corrected';

/** What a notice is about. Deliberately no patient fields: the accession number is the only case identifier. */
export type ReportNotice = {
  kind: NoticeKind;
  caseId: number;
  accession: string;
  version: number;
  supersedesVersion: number | null;
  recipient: { id: number; email: string; name: string };
};

/** What composing a notice needs: the origin its sign-in link points at. */
export type NoticeDeps = { publicOrigin: string };

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

/** A notice composed before the signing transaction opens, ready to be queued inside it. */
export type PreparedNotice = { notice: ReportNotice; subject: string; body: string };

/** Composes the message (reads the laboratory's name); call it before the signing transaction opens. */
export async function prepareReportNotice(deps: NoticeDeps, notice: ReportNotice): Promise<PreparedNotice> {
  const lab = await getLabProfile().catch(() => ({ name: 'the laboratory' }));
  const { subject, text } = composeNotice(notice, deps.publicOrigin, lab.name);
  return { notice, subject, body: text };
}

/**
 * Queues the notice in the durable outbox inside the signing transaction: the signature and its notice are
 * stored together or not at all. The notice worker sends it (call nudgeNoticeWorkers after the commit).
 */
export async function queueReportNotice(prepared: PreparedNotice, reportId: number, transaction: Transaction): Promise<number> {
  const { notice } = prepared;
  return insertNotice(
    {
      kind: notice.kind,
      reportId,
      caseId: notice.caseId,
      recipientUserId: notice.recipient.id,
      recipient: notice.recipient.email,
      subject: prepared.subject,
      body: prepared.body,
    },
    new Date(),
    transaction,
  );
}

export async function getOutbox(mailer: Mailer, schedule: RetrySchedule = DEFAULT_RETRY_SCHEDULE): Promise<Outbox> {
  const [messages, deliveries] = await Promise.all([listOutboxMessages(200), listNotices(200, schedule.maxAttempts)]);
  return {
    messages,
    deliveries,
    localServer: mailer.kind === 'local',
    retryDelaysSeconds: retryDelays(schedule).map((ms) => Math.round(ms / 1000)),
  };
}

/**
 * An administrator asks for a notice that was given up on to be sent again: it becomes due now with a fresh
 * run of tries. Only a failed notice whose text was kept qualifies; anything else is a 409 naming its state.
 */
export async function retryNotice(
  sequelize: Sequelize,
  actor: User,
  id: number,
  schedule: RetrySchedule = DEFAULT_RETRY_SCHEDULE,
): Promise<MailDelivery> {
  const result = await writeTransaction(sequelize, async (t) => {
    const row = await findNotice(id, t);
    if (!row) throw notFound('Notice', id);
    if (row.status !== 'failed') {
      throw invalidState(`Only a notice that could not be sent can be sent again; this one is ${STATE_WORDS[row.status]}.`);
    }
    if (row.body === null) throw invalidState('This notice was recorded before Cristae kept notice texts, so it cannot be sent again.');
    const now = new Date();
    const values = { status: 'pending' as const, attempts: 0, nextAttemptAt: now, leaseUntil: null };
    if (!(await updateNotice(id, { status: 'failed', attempts: row.attempts }, values, t))) {
      throw conflict('Someone else asked for this notice to be sent again at the same moment. Reload to see it.');
    }
    await recordAudit(
      actor,
      {
        action: 'retry',
        entity: 'notice',
        entityId: id,
        before: { status: 'failed', attempts: row.attempts, lastError: row.lastError },
        after: { status: 'pending', attempts: 0 },
      },
      t,
    );
    await row.reload({ transaction: t });
    return toDelivery(row, await accessionOf(row.caseId), schedule.maxAttempts);
  });
  nudgeNoticeWorkers();
  return result;
}

const STATE_WORDS: Record<MailDelivery['status'], string> = {
  pending: 'waiting to be sent',
  sending: 'being sent now',
  sent: 'already sent',
  failed: 'not sent',
};
