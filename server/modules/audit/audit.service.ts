import { Op, type Transaction, type WhereOptions } from 'sequelize';
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

/**
 * What an administrator may read of the trail: accounts (including sign-ins and lock-outs) and the laboratory
 * profile. An allow-list, so an entity added later stays hidden from administrators until someone decides
 * otherwise; events tied to a case never show. Directors read everything.
 */
export const ADMIN_AUDIT_ENTITIES: readonly string[] = ['user', 'lab-profile'];

function visibleTo(viewer: User): WhereOptions {
  if (viewer.role !== 'admin') return {};
  return { entity: { [Op.in]: ADMIN_AUDIT_ENTITIES }, caseId: null };
}

export async function listAudit(q: AuditListQuery, viewer: User): Promise<{ items: AuditEvent[]; total: number }> {
  const filters: Record<string, unknown> = {};
  if (q.entity) filters.entity = q.entity;
  if (q.entityId) filters.entityId = q.entityId;
  if (q.caseId) filters.caseId = q.caseId;
  const where: WhereOptions = { [Op.and]: [filters, visibleTo(viewer)] };
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
