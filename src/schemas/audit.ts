import { z } from 'zod';

export const auditEventSchema = z.object({
  id: z.number().int(),
  at: z.string(),
  actorId: z.number().int().nullable(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  entity: z.string(),
  entityId: z.string().nullable(),
  caseId: z.number().int().nullable(),
  before: z.unknown().nullable(),
  after: z.unknown().nullable(),
  note: z.string().nullable(),
});
export type AuditEvent = z.infer<typeof auditEventSchema>;

export const auditListQuerySchema = z
  .object({
    entity: z.string().max(60).optional(),
    entityId: z.string().max(60).optional(),
    caseId: z.coerce.number().int().positive().optional(),
    page: z.coerce.number().int().min(1).optional(),
    pageSize: z.coerce.number().int().min(1).max(200).optional(),
  })
  .strict();
export type AuditListQuery = z.infer<typeof auditListQuerySchema>;
