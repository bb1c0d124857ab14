import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { reasonInputSchema } from '@/schemas/case';
import { idParamsSchema } from '@/schemas/common';
import { saveDraftInputSchema } from '@/schemas/report';
import { route } from '../../lib/route';
import * as review from './review.service';

export function reviewRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/review', {}, async (_in, _req, res) => {
    res.json({ items: await review.reviewQueue() });
  });
  route(r, 'GET /api/review/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await review.reviewCase(params.id));
  });
  route(r, 'PUT /api/review/:id/draft', { params: idParamsSchema, body: saveDraftInputSchema }, async ({ params, body }, req, res) => {
    res.json(await review.saveDraft(sequelize, req.user!, params.id, body));
  });
  route(r, 'POST /api/review/:id/return', { params: idParamsSchema, body: reasonInputSchema }, async ({ params, body }, req, res) => {
    res.json(await review.returnForWork(sequelize, req.user!, params.id, body));
  });
  return r;
}
