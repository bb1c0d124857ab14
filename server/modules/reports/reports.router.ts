import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { amendCaseInputSchema, correctReportInputSchema, signCaseInputSchema } from '@/schemas/report';
import { route } from '../../lib/route';
import type { NoticeDeps } from '../mail/notices.service';
import { amendCase } from './report-amendment.service';
import { getReportFhirFor } from './report-fhir.service';
import { correctReport, signCase } from './report-signing.service';
import * as reports from './reports.service';

export function reportsRouter(sequelize: Sequelize, notices: NoticeDeps): Router {
  const r = Router();
  route(r, 'GET /api/reports', {}, async (_in, req, res) => {
    res.json(await reports.listReportsFor(req.user!));
  });
  // Registered before /api/reports/:id so the static segment is not read as an id.
  route(r, 'GET /api/reports/by-case', {}, async (_in, req, res) => {
    res.json(await reports.listCaseReportsFor(req.user!));
  });
  route(r, 'GET /api/reports/in-progress', {}, async (_in, req, res) => {
    res.json({ items: await reports.listInProgressFor(req.user!) });
  });
  route(r, 'GET /api/reports/:id', { params: idParamsSchema }, async ({ params }, req, res) => {
    res.json(await reports.getReportFor(req.user!, params.id));
  });
  route(r, 'GET /api/reports/:id/pdf', { params: idParamsSchema }, async ({ params }, req, res) => {
    const file = await reports.getReportPdfFor(req.user!, params.id);
    // The ETag is the stored SHA-256 of these exact bytes, quoted as HTTP requires (RFC 9110 §8.8.3).
    res.set({
      'Content-Type': 'application/pdf',
      'Content-Disposition': `attachment; filename="${file.filename}"`,
      ETag: `"${file.sha256}"`,
      'Cache-Control': 'private, no-cache',
    });
    res.send(file.pdf);
  });
  route(r, 'GET /api/reports/:id/fhir', { params: idParamsSchema }, async ({ params }, req, res) => {
    const { bundle, filename } = await getReportFhirFor(req.user!, params.id);
    // The FHIR JSON media type (hl7.org/fhir/R4/http.html#mime-type).
    res.set({
      'Content-Type': 'application/fhir+json; charset=utf-8',
      'Content-Disposition': `attachment; filename="${filename}"`,
      'Cache-Control': 'private, no-cache',
    });
    res.send(JSON.stringify(bundle));
  });
  route(r, 'GET /api/cases/:id/reports', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json({ items: await reports.listReportsOfCase(params.id) });
  });
  route(r, 'POST /api/cases/:id/sign', { params: idParamsSchema, body: signCaseInputSchema }, async ({ params, body }, req, res) => {
    res.status(201).json(await signCase(sequelize, notices, req.user!, params.id, body));
  });
  route(r, 'POST /api/cases/:id/correct', { params: idParamsSchema, body: correctReportInputSchema }, async ({ params, body }, req, res) => {
    res.status(201).json(await correctReport(sequelize, notices, req.user!, params.id, body));
  });
  route(r, 'POST /api/cases/:id/amend', { params: idParamsSchema, body: amendCaseInputSchema }, async ({ params, body }, req, res) => {
    res.json(await amendCase(sequelize, req.user!, params.id, body));
  });
  return r;
}
