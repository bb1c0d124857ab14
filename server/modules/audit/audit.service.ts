import type { Transaction } from 'sequelize';
import type { AuditEvent, AuditListQuery } from '@/schemas/audit';
import type { User } from '@/schemas/user';
import { AuditEventModel } from './audit.model';

export type AuditEntry = {
  action: string;
  entity: string;
  entityId?: string | number | null;
  caseId?: number | null;
  before?: unknown;
  after?: unknown;
  note?: string | null;
};

/** Appends one event. Pass the transaction of the change it records, so both land or neither does. */
export async function recordAudit(actor: User | null, entry: AuditEntry, transaction?: Transaction): Promise<void> {
  await AuditEventModel.create(
    {
      at: new Date(),
      actorId: actor?.id ?? null,
      actorEmail: actor?.email ?? null,
      action: entry.action,
      entity: entry.entity,
      entityId: entry.entityId == null ? null : String(entry.entityId),
      caseId: entry.caseId ?? null,
      before: entry.before === undefined ? null : JSON.stringify(entry.before),
      after: entry.after === undefined ? null : JSON.stringify(entry.after),
      note: entry.note ?? null,
    },
    { transaction },
  );
}

function toEvent(row: AuditEventModel): AuditEvent {
  const parse = (s: string | null) => (s == null ? null : (JSON.parse(s) as unknown));
  return {
    id: row.id,
    at: row.at.toISOString(),
    actorId: row.actorId,
    actorEmail: row.actorEmail,
    action: row.action,
    entity: row.entity,
    entityId: row.entityId,
    caseId: row.caseId,
    before: parse(row.before),
    after: parse(row.after),
    note: row.note,
  };
}

export async function listAudit(q: AuditListQuery): Promise<{ items: AuditEvent[]; total: number }> {
  const where: Record<string, unknown> = {};
  if (q.entity) where.entity = q.entity;
  if (q.entityId) where.entityId = q.entityId;
  if (q.caseId) where.caseId = q.caseId;
  const pageSize = q.pageSize ?? 50;
  const page = q.page ?? 1;
  const { rows, count } = await AuditEventModel.findAndCountAll({
    where,
    order: [['id', 'DESC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  return { items: rows.map(toEvent), total: count };
}
