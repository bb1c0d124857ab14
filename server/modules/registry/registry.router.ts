import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { cohortFilterSchema, savedSearchInputSchema } from '@/schemas/registry';
import { route } from '../../lib/route';
import * as registry from './registry.service';

/** Cohort search, its plots and the user's saved searches (laboratory staff). */
export function registryRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/registry/cohort', { query: cohortFilterSchema }, async ({ query }, _req, res) => {
    res.json(await registry.searchCohort(query));
  });
  route(r, 'GET /api/registry/cohort/plots', { query: cohortFilterSchema }, async ({ query }, _req, res) => {
    res.json(await registry.plotCohort(query));
  });
  route(r, 'GET /api/registry/saved-searches', {}, async (_in, req, res) => {
    res.json({ items: await registry.listSavedSearchesOf(req.user!) });
  });
  route(r, 'POST /api/registry/saved-searches', { body: savedSearchInputSchema }, async ({ body }, req, res) => {
    res.status(201).json(await registry.saveSearch(sequelize, req.user!, body));
  });
  route(r, 'DELETE /api/registry/saved-searches/:id', { params: idParamsSchema }, async ({ params }, req, res) => {
    await registry.deleteSearch(sequelize, req.user!, params.id);
    res.status(204).end();
  });
  return r;
}
