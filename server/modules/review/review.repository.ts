import type { Priority } from '@/schemas/case';
import type { SpecimenType } from '@/schemas/common';
import { AuditEventModel } from '../audit/audit.model';
import { CaseModel } from '../cases/case.model';
import { UserModel } from '../users/user.model';

export type QueueRow = {
  caseId: number;
  accession: string;
  patientName: string;
  priority: Priority;
  specimenTypes: SpecimenType[];
  receivedAt: Date | null;
  referringClinicianName: string | null;
  patternCode: string | null;
  version: number;
};

export async function listCasesAwaitingReview(): Promise<QueueRow[]> {
  const rows = await CaseModel.findAll({
    where: { state: 'awaiting_review' },
    attributes: ['id', 'accession', 'patientName', 'priority', 'specimenTypes', 'receivedAt', 'referringClinicianId', 'patternCode', 'version'],
  });
  const clinicianIds = [...new Set(rows.map((r) => r.referringClinicianId))];
  const clinicians = clinicianIds.length ? await UserModel.findAll({ where: { id: clinicianIds }, attributes: ['id', 'name'] }) : [];
  const names = new Map(clinicians.map((u) => [u.id, u.name]));
  return rows.map((r) => ({
    caseId: r.id,
    accession: r.accession,
    patientName: r.patientName,
    priority: r.priority as Priority,
    specimenTypes: r.specimenTypes.split(',').filter(Boolean) as SpecimenType[],
    receivedAt: r.receivedAt,
    referringClinicianName: names.get(r.referringClinicianId) ?? null,
    patternCode: r.patternCode,
    version: r.version,
  }));
}

/** When each case last entered "awaiting review", and who moved it there, from the audit trail. */
export async function lastSubmissions(caseIds: number[]): Promise<Map<number, { at: Date; byName: string | null }>> {
  const out = new Map<number, { at: Date; byName: string | null }>();
  if (caseIds.length === 0) return out;
  const events = await AuditEventModel.findAll({
    where: { caseId: caseIds, action: 'state-change', entity: 'case' },
    attributes: ['id', 'caseId', 'at', 'actorId', 'after'],
    order: [['id', 'DESC']],
  });
  const actorIds = new Set<number>();
  const found = new Map<number, { at: Date; actorId: number | null }>();
  for (const e of events) {
    if (e.caseId === null || found.has(e.caseId)) continue;
    const after = e.after ? (JSON.parse(e.after) as { state?: string }) : null;
    if (after?.state !== 'awaiting_review') continue;
    found.set(e.caseId, { at: e.at, actorId: e.actorId });
    if (e.actorId !== null) actorIds.add(e.actorId);
  }
  const actors = actorIds.size ? await UserModel.findAll({ where: { id: [...actorIds] }, attributes: ['id', 'name'] }) : [];
  const names = new Map(actors.map((u) => [u.id, u.name]));
  for (const [caseId, f] of found) out.set(caseId, { at: f.at, byName: f.actorId !== null ? (names.get(f.actorId) ?? null) : null });
  return out;
}
