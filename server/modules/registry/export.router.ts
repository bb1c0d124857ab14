import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { registryExportQuerySchema } from '@/schemas/registry';
import { route } from '../../lib/route';
import { exportRegistry } from './export.service';

/** The registry export (directors only): identified, or de-identified for research with ?deidentified=true. */
export function registryExportRouter(sequelize: Sequelize): Router {
  const r = Router();
  route(r, 'GET /api/registry/export.csv', { query: registryExportQuerySchema }, async ({ query }, req, res) => {
    const file = await exportRegistry(sequelize, req.user!, query);
    // text/csv with its header parameter (RFC 4180 §3).
    res.set({
      'Content-Type': 'text/csv; charset=utf-8; header=present',
      'Content-Disposition': `attachment; filename="${file.filename}"`,
      'Cache-Control': 'private, no-store',
      'X-Export-Rows': String(file.rows),
    });
    res.send(file.csv);
  });
  return r;
}
