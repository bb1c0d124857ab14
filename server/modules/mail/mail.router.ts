import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { route } from '../../lib/route';
import type { Mailer } from './mailer';
import { getOutbox, retryNotice } from './notices.service';

export function mailRouter(sequelize: Sequelize, mailer: Mailer): Router {
  const r = Router();
  route(r, 'GET /api/outbox', {}, async (_in, _req, res) => {
    res.json(await getOutbox(mailer));
  });
  route(r, 'POST /api/outbox/notices/:id/retry', { params: idParamsSchema }, async ({ params }, req, res) => {
    res.json(await retryNotice(sequelize, req.user!, params.id));
  });
  return r;
}
