import type { Sequelize, Transaction } from 'sequelize';
import type { MailDelivery, OutboxMessage } from '@/schemas/report';
import { CaseModel } from '../cases/case.model';
import { writeTransaction } from '../../db/write-transaction';
import { MailDeliveryModel, OutboxMessageModel } from './outbox.model';

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

export type DeliveryRow = Omit<MailDelivery, 'id' | 'accession' | 'attemptedAt'> & {
  caseId: number | null;
  recipientUserId: number | null;
  attemptedAt: Date;
};

export async function insertDelivery(data: DeliveryRow, transaction?: Transaction): Promise<void> {
  await MailDeliveryModel.create(data, { transaction });
}

export async function listDeliveries(limit: number, filter: { reportId?: number } = {}): Promise<MailDelivery[]> {
  const rows = await MailDeliveryModel.findAll({
    where: filter.reportId !== undefined ? { reportId: filter.reportId } : {},
    order: [['id', 'DESC']],
    limit,
  });
  const caseIds = [...new Set(rows.map((r) => r.caseId).filter((x): x is number => x !== null))];
  const cases = caseIds.length ? await CaseModel.findAll({ where: { id: caseIds }, attributes: ['id', 'accession'] }) : [];
  const accessions = new Map(cases.map((c) => [c.id, c.accession]));
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind,
    reportId: r.reportId,
    accession: r.caseId !== null ? (accessions.get(r.caseId) ?? null) : null,
    recipient: r.recipient,
    subject: r.subject,
    status: r.status,
    error: r.error,
    messageId: r.messageId,
    attemptedAt: r.attemptedAt.toISOString(),
  }));
}
