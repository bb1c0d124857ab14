import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { runListQuerySchema, runOverrideInputSchema, runPlanSchema } from '@/schemas/run';
import { route } from '../../lib/route';
import { incomingFile, multipartPlanBody, plateFileUpload } from '../uploads/uploads.router';
import * as runs from './runs.service';

const runUploadBodySchema = multipartPlanBody(runPlanSchema, 'the run layout and conditions');

export function runsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/runs', { query: runListQuerySchema }, async ({ query }, _req, res) => {
    res.json(await runs.listRuns(query));
  });
  // Registered before /api/runs/:id so that "open-specimens" is never read as an id.
  route(r, 'GET /api/runs/open-specimens', {}, async (_input, _req, res) => {
    res.json(await runs.listOpenSpecimens());
  });
  route(r, 'GET /api/runs/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await runs.getRun(params.id));
  });
  route(
    r,
    'POST /api/runs/preview',
    { body: runUploadBodySchema },
    async ({ body }, req, res) => {
      res.json(await runs.previewRun(incomingFile(req.file), body.plan));
    },
    plateFileUpload.single('file'),
  );
  route(
    r,
    'POST /api/runs',
    { body: runUploadBodySchema },
    async ({ body }, req, res) => {
      res.status(201).json(await runs.importRun(sequelize, req.user!, incomingFile(req.file), body.plan));
    },
    plateFileUpload.single('file'),
  );
  route(r, 'POST /api/runs/:id/override', { params: idParamsSchema, body: runOverrideInputSchema }, async ({ params, body }, req, res) => {
    res.json(await runs.overrideRun(sequelize, req.user!, params.id, body));
  });
  return r;
}
