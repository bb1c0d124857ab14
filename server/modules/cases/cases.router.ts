import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import {
  caseListQuerySchema,
  reasonInputSchema,
  receiveSpecimenInputSchema,
  registerCaseInputSchema,
  updateCaseInputSchema,
} from '@/schemas/case';
import { route } from '../../lib/route';
import { receiveSpecimen } from '../specimens/specimens.service';
import { caseHistory } from './case-history';
import * as cases from './cases.service';

export function casesRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/cases', { query: caseListQuerySchema }, async ({ query }, _req, res) => {
    res.json(await cases.listCases(query));
  });
  route(r, 'POST /api/cases', { body: registerCaseInputSchema }, async ({ body }, req, res) => {
    res.status(201).json(await cases.registerCase(sequelize, req.user!, body));
  });
  route(r, 'GET /api/cases/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await cases.getCase(params.id));
  });
  route(r, 'PATCH /api/cases/:id', { params: idParamsSchema, body: updateCaseInputSchema }, async ({ params, body }, req, res) => {
    res.json(await cases.updateCase(sequelize, req.user!, params.id, body));
  });
  route(r, 'POST /api/cases/:id/cancel', { params: idParamsSchema, body: reasonInputSchema }, async ({ params, body }, req, res) => {
    res.json(await cases.cancelCase(sequelize, req.user!, params.id, body));
  });
  route(r, 'GET /api/cases/:id/history', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json({ items: await caseHistory(params.id) });
  });
  route(
    r,
    'POST /api/cases/:id/specimens',
    { params: idParamsSchema, body: receiveSpecimenInputSchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await receiveSpecimen(sequelize, req.user!, params.id, body));
    },
  );
  return r;
}
