import { Router } from 'express';
import { route } from '../../lib/route';
import type { Mailer } from './mailer';
import { getOutbox } from './notices.service';

export function mailRouter(mailer: Mailer): Router {
  const r = Router();
  route(r, 'GET /api/outbox', {}, async (_in, _req, res) => {
    res.json(await getOutbox(mailer));
  });
  return r;
}
