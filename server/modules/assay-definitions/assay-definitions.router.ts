import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { z } from 'zod';
import {
  calculationRequestSchema,
  createAssayDefinitionVersionInputSchema,
  withdrawAssayDefinitionInputSchema,
} from '@/schemas/assay';
import { assayCodeSchema } from '@/schemas/common';
import { route } from '../../lib/route';
import * as definitions from './assay-definitions.service';

const codeParamsSchema = z.object({ code: assayCodeSchema });
const versionParamsSchema = codeParamsSchema.extend({ version: z.coerce.number().int().positive() });

export function assayDefinitionsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/assay-definitions', {}, async (_in, _req, res) => {
    res.json(await definitions.listCurrentDefinitions());
  });
  route(r, 'GET /api/assay-definitions/:code/versions', { params: codeParamsSchema }, async ({ params }, _req, res) => {
    res.json({ items: await definitions.listDefinitionVersions(params.code) });
  });
  route(
    r,
    'POST /api/assay-definitions/:code/versions',
    { params: codeParamsSchema, body: createAssayDefinitionVersionInputSchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await definitions.createDefinitionVersion(sequelize, req.user!, params.code, body));
    },
  );
  route(
    r,
    'POST /api/assay-definitions/:code/versions/:version/approve',
    { params: versionParamsSchema },
    async ({ params }, req, res) => {
      res.json(await definitions.approveDefinitionVersion(sequelize, req.user!, params.code, params.version));
    },
  );
  route(
    r,
    'POST /api/assay-definitions/:code/versions/:version/withdraw',
    { params: versionParamsSchema, body: withdrawAssayDefinitionInputSchema },
    async ({ params, body }, req, res) => {
      res.json(await definitions.withdrawDefinitionVersion(sequelize, req.user!, params.code, params.version, body));
    },
  );
  route(r, 'POST /api/calculations/activity', { body: calculationRequestSchema }, async ({ body }, _req, res) => {
    res.json(await definitions.previewActivity(body));
  });
  return r;
}
