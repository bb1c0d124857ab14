import { Router } from 'express';
import multer from 'multer';
import type { Sequelize } from 'sequelize';
import { z } from 'zod';
import { idParamsSchema } from '@/schemas/common';
import { plateImportPlanSchema } from '@/schemas/measurement';
import { MAX_PLATE_FILE_BYTES } from '@/schemas/plate';
import { badInput, notFound } from '../../lib/errors';
import { route } from '../../lib/route';
import { findCaseById } from '../cases/cases.repository';
import * as plates from './plate-import.service';

/** A plate file arrives as multipart form data: the file in "file", the reading plan as JSON text in "plan". */
export function multipartPlanBody<T extends z.ZodType>(planSchema: T, what: string) {
  return z.object({
    plan: z
      .string({ error: `plan is required: ${what} as JSON` })
      .transform((text, ctx) => {
        try {
          return JSON.parse(text) as unknown;
        } catch {
          ctx.addIssue({ code: 'custom', message: 'plan is not valid JSON' });
          return z.NEVER;
        }
      })
      .pipe(planSchema),
  });
}

const plateUploadBodySchema = multipartPlanBody(plateImportPlanSchema, 'the plate map, specimens and conditions');

export const plateFileUpload = multer({
  storage: multer.memoryStorage(),
  // One byte over the parser's own limit, so the parser reports "too large" with the limit in its words.
  limits: { fileSize: MAX_PLATE_FILE_BYTES + 1, files: 1, fields: 4, fieldSize: 256 * 1024 },
});

export function incomingFile(file: Express.Multer.File | undefined): plates.IncomingFile {
  if (!file) throw badInput({ file: 'Choose the plate file to upload' }, 'No plate file was sent');
  return { originalname: file.originalname, mimetype: file.mimetype, size: file.size, buffer: file.buffer };
}

export function uploadsRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(
    r,
    'POST /api/cases/:id/plate-uploads/preview',
    { params: idParamsSchema, body: plateUploadBodySchema },
    async ({ params, body }, req, res) => {
      res.json(await plates.previewPlateImport(params.id, incomingFile(req.file), body.plan));
    },
    plateFileUpload.single('file'),
  );
  route(
    r,
    'POST /api/cases/:id/plate-uploads',
    { params: idParamsSchema, body: plateUploadBodySchema },
    async ({ params, body }, req, res) => {
      res.status(201).json(await plates.importPlate(sequelize, req.user!, params.id, incomingFile(req.file), body.plan));
    },
    plateFileUpload.single('file'),
  );
  route(r, 'GET /api/cases/:id/uploads', { params: idParamsSchema }, async ({ params }, _req, res) => {
    if (!(await findCaseById(params.id))) throw notFound('Case', params.id);
    res.json({ items: await plates.listUploadsOfCase(params.id) });
  });
  route(r, 'GET /api/uploads/:id/download', { params: idParamsSchema }, async ({ params }, _req, res) => {
    const file = await plates.getUploadFile(params.id);
    res.attachment(file.filename);
    res.setHeader('Content-Type', file.mimeType);
    res.setHeader('X-Content-SHA256', file.sha256);
    res.setHeader('Cache-Control', 'private, no-store');
    res.send(file.content);
  });
  return r;
}
