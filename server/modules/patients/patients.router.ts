import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { createPatientInputSchema, patientSearchQuerySchema, updatePatientInputSchema } from '@/schemas/case';
import { route } from '../../lib/route';
import * as patients from './patients.service';

export function patientsRouter(sequelize: Sequelize): Router {
  const r = Router();
  // Registered before /:id so "search" is never read as an id.
  route(r, 'GET /api/patients/search', { query: patientSearchQuerySchema }, async ({ query }, _req, res) => {
    res.json({ items: await patients.findPatients(query.q) });
  });
  route(r, 'POST /api/patients', { body: createPatientInputSchema }, async ({ body }, req, res) => {
    res.status(201).json(await patients.registerPatient(sequelize, req.user!, body));
  });
  route(r, 'GET /api/patients/:id', { params: idParamsSchema }, async ({ params }, _req, res) => {
    res.json(await patients.getPatient(params.id));
  });
  route(r, 'PATCH /api/patients/:id', { params: idParamsSchema, body: updatePatientInputSchema }, async ({ params, body }, req, res) => {
    res.json(await patients.correctPatient(sequelize, req.user!, params.id, body));
  });
  return r;
}
