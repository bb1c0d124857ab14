import { Router } from 'express';
import { auditListQuerySchema } from '@/schemas/audit';
import { route } from '../../lib/route';
import { listAudit } from './audit.service';

export function auditRouter(): Router {
  const r = Router();
  route(r, 'GET /api/audit', { query: auditListQuerySchema }, async ({ query }, req, res) => {
    res.json(await listAudit(query, req.user!));
  });
  return r;
}
