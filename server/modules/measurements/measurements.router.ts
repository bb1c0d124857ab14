import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import {
  createMeasurementInputSchema,
  excludeMeasurementInputSchema,
  includeMeasurementInputSchema,
  proteinCurveInputSchema,
  saveProteinInputSchema,
  updateMeasurementInputSchema,
  versionQuerySchema,
} from '@/schemas/measurement';
import { route } from '../../lib/route';
import * as measurements from './measurements.service';
import * as protein from './protein.service';

export function measurementsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/cases/:id/workup', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await measurements.getCaseWorkup(params.id));
  });
  route(r, 'GET /api/cases/:id/measurements', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json({ items: await measurements.listCaseMeasurements(params.id) });
  });
  route(
    r,
    'POST /api/cases/:id/measurements/preview',
    { params: idParamsSchema, body: createMeasurementInputSchema },
    async ({ params, body }, _req, res) => {
      res.json(await measurements.previewMeasurement(params.id, body));
    },
  );
  route(
    r,
    'POST /api/cases/:id/measurements',
    { params: idParamsSchema, body: createMeasurementInputSchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await measurements.createMeasurement(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'PUT /api/measurements/:id',
    { params: idParamsSchema, body: updateMeasurementInputSchema },
    async ({ params, body }, req, res) => {
      res.json(await measurements.updateMeasurement(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'POST /api/measurements/:id/exclude',
    { params: idParamsSchema, body: excludeMeasurementInputSchema },
    async ({ params, body }, req, res) => {
      res.json(await measurements.excludeMeasurement(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'POST /api/measurements/:id/include',
    { params: idParamsSchema, body: includeMeasurementInputSchema },
    async ({ params, body }, req, res) => {
      res.json(await measurements.includeMeasurement(sequelize, req.user!, params.id, body));
    },
  );
  route(r, 'DELETE /api/measurements/:id', { params: idParamsSchema, query: versionQuerySchema }, async ({ params, query }, req, res) => {
    await measurements.deleteMeasurement(sequelize, req.user!, params.id, query.version);
    res.status(204).end();
  });
  route(r, 'POST /api/protein-curves/preview', { body: proteinCurveInputSchema }, async ({ body }, _req, res) => {
    res.json(protein.evaluateProteinCurve(body));
  });
  route(r, 'PUT /api/specimens/:id/protein', { params: idParamsSchema, body: saveProteinInputSchema }, async ({ params, body }, req, res) => {
    res.json(await protein.saveSpecimenProtein(sequelize, req.user!, params.id, body));
  });
  return r;
}
