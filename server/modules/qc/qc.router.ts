import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import {
  chartQuerySchema,
  createControlMaterialBodySchema,
  createControlTargetBodySchema,
  establishControlTargetBodySchema,
  patchControlMaterialBodySchema,
  putQcRulesBodySchema,
  qcEvaluateRequestSchema,
} from '@/schemas/qc';
import { route } from '../../lib/route';
import { evaluateWestgard } from '../../domain/qc/westgard';
import * as materials from './control-materials.service';
import { getLabQcRules, saveLabQcRules } from './qc-rules.service';

export function qcRouter(sequelize: Sequelize): Router {
  const r = Router();

  // The stateless evaluation: the contract other checks and the run pages rely on. Stores nothing.
  route(r, 'POST /api/qc/evaluate', { body: qcEvaluateRequestSchema }, ({ body }, _req, res) => {
    res.json({ runs: evaluateWestgard(body.levels, body.runs, { rules: body.rules }) });
  });
  route(r, 'GET /api/qc/rules', {}, async (_in, _req, res) => {
    res.json(await getLabQcRules());
  });
  route(r, 'PUT /api/qc/rules', { body: putQcRulesBodySchema }, async ({ body }, req, res) => {
    res.json(await saveLabQcRules(sequelize, req.user!, body));
  });

  route(r, 'GET /api/control-materials', {}, async (_in, _req, res) => {
    res.json({ items: await materials.listMaterials() });
  });
  route(r, 'POST /api/control-materials', { body: createControlMaterialBodySchema }, async ({ body }, req, res) => {
    res.status(201).json(await materials.createMaterial(sequelize, req.user!, body));
  });
  route(r, 'GET /api/control-materials/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await materials.getMaterial(params.id));
  });
  route(
    r,
    'PATCH /api/control-materials/:id',
    { params: idParamsSchema, body: patchControlMaterialBodySchema },
    async ({ params, body }, req, res) => {
      res.json(await materials.patchMaterial(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'GET /api/control-materials/:id/chart',
    { params: idParamsSchema, query: chartQuerySchema },
    async ({ params, query }, _req, res) => {
      res.json(await materials.chartData(params.id, query.assay));
    },
  );
  route(
    r,
    'POST /api/control-materials/:id/targets',
    { params: idParamsSchema, body: createControlTargetBodySchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await materials.enterTarget(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'POST /api/control-materials/:id/targets/establish',
    { params: idParamsSchema, body: establishControlTargetBodySchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await materials.establishTarget(sequelize, req.user!, params.id, body.assayCode));
    },
  );
  route(r, 'POST /api/control-targets/:id/approve', { params: idParamsSchema }, async ({ params }, req, res) => {
    res.json(await materials.approveTarget(sequelize, req.user!, params.id));
  });
  return r;
}
