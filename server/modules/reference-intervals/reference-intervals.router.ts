import { Router } from 'express';
import multer from 'multer';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { deriveRequestSchema, verificationRequestSchema } from '@/schemas/reference-interval';
import {
  controlSelectionSchema,
  controlUploadIdParamsSchema,
  createIntervalBodySchema,
  draftFromControlsBodySchema,
  editDraftBodySchema,
  partitionBodySchema,
  retireBodySchema,
  revisionBodySchema,
} from '@/schemas/reference-interval-api';
import { route } from '../../lib/route';
import * as controls from './control-data.service';
import * as intervals from './reference-intervals.service';

/** One CSV per request, held in memory: control files are small, and they are kept in the database. */
const controlUpload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: controls.MAX_CONTROL_FILE_BYTES, files: 1, fields: 10 },
}).single('file');

export function referenceIntervalsRouter(sequelize: Sequelize): Router {
  const r = Router();

  route(r, 'GET /api/reference-intervals', {}, async (_in, req, res) => {
    res.json({ items: await intervals.listCurrentIntervals(req.user!) });
  });
  route(r, 'POST /api/reference-intervals', { body: createIntervalBodySchema }, async ({ body }, req, res) => {
    res.status(201).json(await intervals.createDraft(sequelize, req.user!, body));
  });

  // Computations that store nothing.
  route(r, 'POST /api/reference-intervals/derive', { body: deriveRequestSchema }, ({ body }, _req, res) => {
    res.json(controls.deriveFromValues(body));
  });
  route(r, 'POST /api/reference-intervals/verify', { body: verificationRequestSchema }, ({ body }, _req, res) => {
    res.json(controls.verifyAdoptedInterval(body));
  });
  route(r, 'POST /api/reference-intervals/partition', { body: partitionBodySchema }, ({ body }, _req, res) => {
    res.json(controls.checkGroups(body));
  });

  // Control files. Registered before "/:id" so "controls" is never read as an id.
  route(r, 'GET /api/reference-intervals/controls', {}, async (_in, _req, res) => {
    res.json({ items: await controls.listControlFiles() });
  });
  route(
    r,
    'POST /api/reference-intervals/controls',
    {},
    async (_in, req, res) => {
      const stored = await controls.storeControlFile(sequelize, req.user!, req.file);
      res.status(stored.alreadyStored ? 200 : 201).json(stored);
    },
    controlUpload,
  );
  route(r, 'GET /api/reference-intervals/controls/:id', { params: controlUploadIdParamsSchema }, async ({ params }, _req, res) => {
    res.json(await controls.getControlFile(params.id));
  });
  route(
    r,
    'GET /api/reference-intervals/controls/:id/file',
    { params: controlUploadIdParamsSchema },
    async ({ params }, _req, res) => {
      const file = await controls.getControlFileContent(params.id);
      res.attachment(file.filename).type('text/csv').send(file.content);
    },
  );
  route(
    r,
    'POST /api/reference-intervals/controls/:id/preview',
    { params: controlUploadIdParamsSchema, body: controlSelectionSchema },
    async ({ params, body }, _req, res) => {
      res.json(await controls.previewFromControls(params.id, body));
    },
  );
  route(
    r,
    'POST /api/reference-intervals/controls/:id/draft',
    { params: controlUploadIdParamsSchema, body: draftFromControlsBodySchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await controls.createDraftFromControls(sequelize, req.user!, params.id, body));
    },
  );

  route(r, 'GET /api/reference-intervals/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await intervals.getInterval(params.id));
  });
  route(r, 'GET /api/reference-intervals/:id/history', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json({ items: await intervals.listVersions(params.id) });
  });
  route(
    r,
    'PATCH /api/reference-intervals/:id',
    { params: idParamsSchema, body: editDraftBodySchema },
    async ({ params, body }, req, res) => {
      res.json(await intervals.editDraft(sequelize, req.user!, params.id, body));
    },
  );
  route(
    r,
    'POST /api/reference-intervals/:id/approve',
    { params: idParamsSchema, body: revisionBodySchema },
    async ({ params, body }, req, res) => {
      res.json(await intervals.approveInterval(sequelize, req.user!, params.id, body.revision));
    },
  );
  route(
    r,
    'POST /api/reference-intervals/:id/retire',
    { params: idParamsSchema, body: retireBodySchema },
    async ({ params, body }, req, res) => {
      res.json(await intervals.retireInterval(sequelize, req.user!, params.id, body));
    },
  );
  return r;
}
