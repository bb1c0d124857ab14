import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { changePlateMapInputSchema, versionQuerySchema } from '@/schemas/measurement';
import { createPlateMapInputSchema } from '@/schemas/plate';
import { route } from '../../lib/route';
import * as plateMaps from './plate-maps.service';

export function plateMapsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/plate-maps', {}, async (_in, _req, res) => {
    res.json({ items: await plateMaps.listPlateMaps() });
  });
  route(r, 'GET /api/plate-maps/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await plateMaps.getPlateMap(params.id));
  });
  route(r, 'POST /api/plate-maps', { body: createPlateMapInputSchema.strict() }, async ({ body }, req, res) => {
    res.status(201).json(await plateMaps.createPlateMap(sequelize, req.user!, body));
  });
  route(r, 'PATCH /api/plate-maps/:id', { params: idParamsSchema, body: changePlateMapInputSchema }, async ({ params, body }, req, res) => {
    res.json(await plateMaps.changePlateMap(sequelize, req.user!, params.id, body));
  });
  route(r, 'DELETE /api/plate-maps/:id', { params: idParamsSchema, query: versionQuerySchema }, async ({ params, query }, req, res) => {
    await plateMaps.deletePlateMap(sequelize, req.user!, params.id, query.version);
    res.status(204).end();
  });
  return r;
}
