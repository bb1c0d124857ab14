import express, { Router, type RequestHandler } from 'express';
import helmet from 'helmet';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { fixedHeaders } from '../../../../server/lib/fixed-headers';
import { scoped } from '../../../../server/lib/scoped-router';

/*
 * Two request-path helpers checked against the libraries they stand in for: fixedHeaders(helmet(...)) must send
 * exactly the headers helmet sends itself [confirmed: helmet 8 is the reference, run beside it in the same test],
 * and a scoped router must answer every request Express's own routing answers, including Express's
 * case-insensitive paths and trailing slash [confirmed: Express 5 defaults, caseSensitive and strict off], while
 * requests for other resources pass it by.
 */

const helmetOptions = {
  contentSecurityPolicy: { useDefaults: false, directives: { defaultSrc: ["'self'"], objectSrc: ["'none'"] } },
};

function headersFrom(middleware: RequestHandler) {
  const app = express();
  app.disable('x-powered-by');
  app.use(middleware);
  app.get('/x', (_req, res) => void res.json({ ok: true }));
  return request(app).get('/x');
}

const withoutVolatile = (h: Record<string, string>) => {
  const { date: _d, etag: _e, ...rest } = h;
  return rest;
};

describe('fixedHeaders', () => {
  it('when wrapped around helmet, then every answer carries the same headers as helmet sends itself', async () => {
    const direct = await headersFrom(helmet(helmetOptions));
    const fixed = await headersFrom(fixedHeaders(helmet(helmetOptions)));
    expect(withoutVolatile(fixed.headers)).toEqual(withoutVolatile(direct.headers));
    expect(fixed.headers['content-security-policy']).toBe("default-src 'self';object-src 'none'");
    expect(fixed.headers['x-frame-options']).toBe('SAMEORIGIN');
  });

  it('when a middleware reads the request, then it is used as it is, per request', async () => {
    const perRequest: RequestHandler = (req, res, next) => {
      res.setHeader('X-Path', req.path);
      next();
    };
    const wrapped = fixedHeaders(perRequest);
    expect(wrapped).toBe(perRequest);
    expect((await headersFrom(wrapped)).headers['x-path']).toBe('/x');
  });

  it('when a middleware does not call next at once, then it is used as it is', () => {
    const later: RequestHandler = (_req, _res, next) => void setTimeout(next, 0);
    expect(fixedHeaders(later)).toBe(later);
  });
});

describe('scoped', () => {
  function appWithScopedRouters() {
    const cases = Router();
    cases.get('/api/cases', (_req, res) => void res.json({ from: 'cases' }));
    cases.get('/api/cases/:id', (req, res) => void res.json({ from: 'cases', id: req.params.id }));
    const patients = Router();
    patients.post('/api/patients', (_req, res) => void res.status(201).json({ from: 'patients' }));
    const anyPath = Router();
    anyPath.get('/api/:thing/count', (req, res) => void res.json({ from: 'anyPath', thing: req.params.thing }));
    const app = express();
    app.use(scoped(patients));
    app.use(scoped(cases));
    app.use(scoped(anyPath));
    app.use((_req, res) => void res.status(404).json({ from: 'fallthrough' }));
    return app;
  }

  it('when a request is under a router\'s own prefix, then that router answers it, in any letter case and with a trailing slash', async () => {
    const app = appWithScopedRouters();
    expect((await request(app).get('/api/cases')).body).toEqual({ from: 'cases' });
    expect((await request(app).get('/API/Cases/')).body).toEqual({ from: 'cases' });
    expect((await request(app).get('/api/cases/42')).body).toEqual({ from: 'cases', id: '42' });
    expect((await request(app).post('/api/patients')).status).toBe(201);
  });

  it('when a router has a route with a parameter in its first segments, then it sees every request', async () => {
    const app = appWithScopedRouters();
    expect((await request(app).get('/api/cases/count')).body).toEqual({ from: 'cases', id: 'count' });
    expect((await request(app).get('/api/runs/count')).body).toEqual({ from: 'anyPath', thing: 'runs' });
  });

  it('when no router has the path, then the request goes on to what follows, as without scoping', async () => {
    const app = appWithScopedRouters();
    const res = await request(app).get('/api/casework');
    expect(res.status).toBe(404);
    expect(res.body).toEqual({ from: 'fallthrough' });
  });
});
