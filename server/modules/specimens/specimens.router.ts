import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { createRejectionReasonInputSchema, updateSpecimenInputSchema } from '@/schemas/case';
import { route } from '../../lib/route';
import * as specimens from './specimens.service';

export function specimensRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'PATCH /api/specimens/:id', { params: idParamsSchema, body: updateSpecimenInputSchema }, async ({ params, body }, req, res) => {
    res.json(await specimens.changeSpecimen(sequelize, req.user!, params.id, body));
  });
  route(r, 'GET /api/rejection-reasons', {}, async (_in, _req, res) => {
    res.json({ items: await specimens.listRejectionReasons() });
  });
  route(r, 'POST /api/rejection-reasons', { body: createRejectionReasonInputSchema }, async ({ body }, req, res) => {
    res.status(201).json(await specimens.addRejectionReason(sequelize, req.user!, body));
  });
  return r;
}
