import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { idParamsSchema } from '@/schemas/common';
import { createUserInputSchema, resetPasswordInputSchema, updateUserInputSchema } from '@/schemas/user';
import { route } from '../../lib/route';
import * as users from './users.service';

export function usersRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/users', {}, async (_in, _req, res) => {
    res.json({ items: await users.listAccounts() });
  });
  route(r, 'POST /api/users', { body: createUserInputSchema }, async ({ body }, req, res) => {
    res.status(201).json(await users.createAccount(sequelize, req.user!, body));
  });
  route(r, 'PATCH /api/users/:id', { params: idParamsSchema, body: updateUserInputSchema }, async ({ params, body }, req, res) => {
    res.json(await users.updateAccount(sequelize, req.user!, params.id, body));
  });
  route(r, 'POST /api/users/:id/password', { params: idParamsSchema, body: resetPasswordInputSchema }, async ({ params, body }, req, res) => {
    await users.resetPassword(sequelize, req.user!, params.id, body);
    res.status(204).end();
  });
  route(r, 'GET /api/clinicians', {}, async (_in, _req, res) => {
    res.json({ items: await users.listActiveClinicians() });
  });
  return r;
}
