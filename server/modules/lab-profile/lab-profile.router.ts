import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { updateLabProfileInputSchema } from '@/schemas/lab-profile';
import { route } from '../../lib/route';
import { getLabProfile, saveLabProfile } from './lab-profile.service';

export function labProfileRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/lab-profile', {}, async (_in, _req, res) => {
    res.json(await getLabProfile());
  });
  route(r, 'PUT /api/lab-profile', { body: updateLabProfileInputSchema }, async ({ body }, req, res) => {
    res.json(await saveLabProfile(sequelize, req.user!, body));
  });
  return r;
}
