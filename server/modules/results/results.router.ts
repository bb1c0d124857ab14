import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { submitCaseInputSchema } from '@/schemas/results';
import { route } from '../../lib/route';
import * as results from './results.service';

export function resultsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/cases/:id/results', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await results.getCaseResults(params.id));
  });
  route(r, 'POST /api/cases/:id/submit', { params: idParamsSchema, body: submitCaseInputSchema }, async ({ params, body }, req, res) => {
    res.json(await results.submitCaseForReview(sequelize, req.user!, params.id, body));
  });
  return r;
}
