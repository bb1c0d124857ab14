import { Op, type InferAttributes, type InferCreationAttributes, type Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import type { MailDelivery, OutboxMessage } from '@/schemas/report';
import { CaseModel } from '../cases/case.model';
import { writeTransaction } from '../../db/write-transaction';
import { NoticeModel, OutboxMessageModel } from './outbox.model';

/** Queued with the registry's other writes: an in-memory database has one connection, shared by all. */
export async function insertOutboxMessage(sequelize: Sequelize, data: {
  messageId: string | null;
  fromAddress: string | null;
  toAddress: string;
  subject: string;
  text: string;
  receivedAt: Date;
}): Promise<void> {
  await writeTransaction(sequelize, (transaction) => OutboxMessageModel.create(data, { transaction }));
}

export async function listOutboxMessages(limit: number): Promise<OutboxMessage[]> {
  const rows = await OutboxMessageModel.findAll({ order: [['id', 'DESC']], limit });
  return rows.map((r) => ({
    id: r.id,
    messageId: r.messageId,
    from: r.fromAddress,
    to: r.toAddress,
    subject: r.subject,
    text: r.text,
    receivedAt: r.receivedAt.toISOString(),
  }));
}

export type NewNotice = Pick<
  InferCreationAttributes<NoticeModel>,
  'kind' | 'reportId' | 'caseId' | 'recipientUserId' | 'recipient' | 'subject' | 'body'
>;

/** Writes a pending notice, due at `now`, inside the caller's (signing) transaction. */
export async function insertNotice(data: NewNotice, now: Date, transaction: Transaction): Promise<number> {
  const row = await NoticeModel.create(
    { ...data, status: 'pending', attempts: 0, nextAttemptAt: now, createdAt: now },
    { transaction },
  );
  return row.id;
}

/** Pending notices that are due, and notices whose sending lease ran out (their process stopped mid-send). */
export async function findDueNotices(now: Date, limit: number, transaction: Transaction): Promise<NoticeModel[]> {
  return NoticeModel.findAll({
    where: {
      [Op.or]: [
        { status: 'pending', nextAttemptAt: { [Op.lte]: now } },
        { status: 'sending', leaseUntil: { [Op.lte]: now } },
      ],
    },
    order: [['id', 'ASC']],
    limit,
    transaction,
  });
}

export async function findNotice(id: number, transaction?: Transaction): Promise<NoticeModel | null> {
  return NoticeModel.findByPk(id, { transaction });
}

/** Updates one notice if it still matches `expect` (its state as the caller last saw it); returns whether it did. */
export async function updateNotice(
  id: number,
  expect: WhereOptions<InferAttributes<NoticeModel>>,
  values: Partial<InferAttributes<NoticeModel>>,
  transaction: Transaction,
): Promise<boolean> {
  const [n] = await NoticeModel.update(values, { where: { ...expect, id }, transaction });
  return n === 1;
}

export function toDelivery(r: NoticeModel, accession: string | null, maxAttempts: number): MailDelivery {
  const iso = (d: Date | null) => (d ? d.toISOString() : null);
  return {
    id: r.id,
    kind: r.kind,
    reportId: r.reportId,
    accession,
    recipient: r.recipient,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    maxAttempts,
    lastError: r.lastError,
    messageId: r.messageId,
    queuedAt: r.createdAt.toISOString(),
    lastAttemptAt: iso(r.lastAttemptAt),
    nextAttemptAt: r.status === 'pending' ? iso(r.nextAttemptAt) : null,
    sentAt: iso(r.sentAt),
    canRetry: r.status === 'failed' && r.body !== null,
  };
}

export async function accessionOf(caseId: number | null): Promise<string | null> {
  if (caseId === null) return null;
  const c = await CaseModel.findByPk(caseId, { attributes: ['id', 'accession'] });
  return c?.accession ?? null;
}

export async function listNotices(limit: number, maxAttempts: number, filter: { reportId?: number } = {}): Promise<MailDelivery[]> {
  const rows = await NoticeModel.findAll({
    where: filter.reportId !== undefined ? { reportId: filter.reportId } : {},
    order: [['id', 'DESC']],
    limit,
  });
  const caseIds = [...new Set(rows.map((r) => r.caseId).filter((x): x is number => x !== null))];
  const cases = caseIds.length ? await CaseModel.findAll({ where: { id: caseIds }, attributes: ['id', 'accession'] }) : [];
  const accessions = new Map(cases.map((c) => [c.id, c.accession]));
  return rows.map((r) => toDelivery(r, r.caseId !== null ? (accessions.get(r.caseId) ?? null) : null, maxAttempts));
}
