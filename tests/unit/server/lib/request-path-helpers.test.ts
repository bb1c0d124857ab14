import express, { Router, type Request, type RequestHandler, type Response } from 'express';
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

/** A stand-in response that writes down, in order, every header call made on it. */
function recordingResponse() {
  const calls: unknown[][] = [];
  const res = {
    setHeader: (name: string, value: unknown) => void calls.push(['setHeader', name, value]),
    removeHeader: (name: string) => void calls.push(['removeHeader', name]),
  } as unknown as Response;
  return { res, calls };
}

const anyRequest = {} as Request;

describe('fixedHeaders, what it promises beyond the same headers', () => {
  it('when a middleware only sets headers and calls next at once, then it runs once when wrapped and never per request', async () => {
    // Doc comment of fixedHeaders: the headers are "worked out once instead of on every request".
    let runs = 0;
    const headersOnly: RequestHandler = (_req, res, next) => {
      runs += 1;
      res.setHeader('X-Fixed', 'yes');
      next();
    };
    const wrapped = fixedHeaders(headersOnly);
    expect(runs).toBe(1);
    expect(wrapped).not.toBe(headersOnly);
    const first = await headersFrom(wrapped);
    const second = await headersFrom(wrapped);
    expect(runs).toBe(1);
    expect(first.headers['x-fixed']).toBe('yes');
    expect(second.headers['x-fixed']).toBe('yes');
  });

  it('when wrapped around helmet, then the replay makes exactly the header calls helmet makes itself, nothing more', () => {
    // Reference: helmet 8 run directly on the same kind of stand-in response [confirmed: run beside it here]; helmet
    // hides X-Powered-By with removeHeader [helmet 8 documentation, x-powered-by].
    const direct = recordingResponse();
    let directNext = 0;
    void helmet(helmetOptions)(anyRequest, direct.res, () => void (directNext += 1));
    const replayed = recordingResponse();
    let replayNext = 0;
    void fixedHeaders(helmet(helmetOptions))(anyRequest, replayed.res, () => void (replayNext += 1));
    expect(replayed.calls).toEqual(direct.calls);
    expect(replayed.calls).toContainEqual(['removeHeader', 'X-Powered-By']);
    expect(replayed.calls.filter((c) => c[0] === 'removeHeader')).toEqual([['removeHeader', 'X-Powered-By']]);
    expect([directNext, replayNext]).toEqual([1, 1]);
  });

  it('when a middleware sets a header and then removes it, then the answer has no such header, as with the middleware itself', async () => {
    // Reference: the same middleware mounted directly in Express 5 [confirmed: run beside it here]; Node's
    // removeHeader drops a header set earlier on the same response [Node.js http documentation].
    const setThenRemove: RequestHandler = (_req, res, next) => {
      res.setHeader('X-Temporary', '1');
      res.removeHeader('X-Temporary');
      res.setHeader('X-Kept', '2');
      next();
    };
    const direct = await headersFrom(setThenRemove);
    const fixed = await headersFrom(fixedHeaders(setThenRemove));
    expect(direct.headers['x-temporary']).toBeUndefined();
    expect(fixed.headers['x-temporary']).toBeUndefined();
    expect(fixed.headers['x-kept']).toBe('2');
    // Hand-worked order of calls: remove X-Gone, set X-Temporary, remove X-Temporary, set X-Kept.
    const removeFirst: RequestHandler = (_req, res, next) => {
      res.removeHeader('X-Gone');
      setThenRemove(_req, res, next);
    };
    const replayed = recordingResponse();
    void fixedHeaders(removeFirst)(anyRequest, replayed.res, () => undefined);
    expect(replayed.calls).toEqual([
      ['removeHeader', 'X-Gone'],
      ['setHeader', 'X-Temporary', '1'],
      ['removeHeader', 'X-Temporary'],
      ['setHeader', 'X-Kept', '2'],
    ]);
  });

  it('when a middleware looks at anything else on the response, then it is used as it is, per request', async () => {
    // Doc comment: "does anything else with the response" means the middleware itself is used unchanged.
    let runs = 0;
    const readsResponse: RequestHandler = (_req, res, next) => {
      runs += 1;
      if (!res.headersSent) res.setHeader('X-Checked', 'yes');
      next();
    };
    const wrapped = fixedHeaders(readsResponse);
    expect(wrapped).toBe(readsResponse);
    expect((await headersFrom(wrapped)).headers['x-checked']).toBe('yes');
    expect(runs).toBe(2); // once when wrapped, once for the request
  });

  it('when a middleware calls next with an error, then it is used as it is', () => {
    // Doc comment: a middleware that does not finish (next with an error is a failure, not a finish [Express 5
    // guide, error handling]) is used unchanged.
    const failing: RequestHandler = (_req, res, next) => {
      res.setHeader('X-A', '1');
      next(new Error('refused'));
    };
    expect(fixedHeaders(failing)).toBe(failing);
  });

  it('when a middleware throws, before or after calling next, then it is used as it is', () => {
    // Doc comment: only a middleware that finishes at once is replaced; a throw is not a finish.
    const throwsAtOnce: RequestHandler = () => {
      throw new Error('broken');
    };
    const throwsAfterNext: RequestHandler = (_req, res, next) => {
      res.setHeader('X-A', '1');
      next();
      throw new Error('broken late');
    };
    expect(fixedHeaders(throwsAtOnce)).toBe(throwsAtOnce);
    expect(fixedHeaders(throwsAfterNext)).toBe(throwsAfterNext);
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

/**
 * A router wrapped so that a test can count the requests that enter it and the reads of its routes; the wrapper
 * carries the router's own `stack`, which is all scoped() reads of it.
 */
function countingRouter(router: Router) {
  const seen = { entered: 0, stackReads: 0 };
  const handler = (req: Request, res: Response, next: (err?: unknown) => void) => {
    seen.entered += 1;
    router(req, res, next);
  };
  Object.defineProperty(handler, 'stack', {
    get: () => {
      seen.stackReads += 1;
      return router.stack;
    },
  });
  return { router: handler as unknown as Router, seen };
}

/** One app with the router mounted plainly and one with it scoped, each with the same fallthrough after it. */
function plainAndScoped(router: Router) {
  const counted = countingRouter(router);
  const build = (mounted: RequestHandler) => {
    const app = express();
    app.use(mounted);
    app.use((_req, res) => void res.status(404).json({ from: 'fallthrough' }));
    return app;
  };
  return { plain: build(router), scopedApp: build(scoped(counted.router)), seen: counted.seen };
}

async function sameAnswer(plain: express.Express, scopedApp: express.Express, method: 'get' | 'post', path: string) {
  const a = await request(plain)[method](path);
  const b = await request(scopedApp)[method](path);
  expect({ path, status: b.status, body: b.body as unknown }).toEqual({ path, status: a.status, body: a.body as unknown });
  return b;
}

describe('scoped, which requests enter the router', () => {
  it('when a request is under another prefix, then it never enters the router; under its own, in any case and with a trailing slash, it does', async () => {
    // Doc comment of scoped: "only requests under its own prefixes (/api/<resource>) enter it"; Express 5 routing is
    // case-insensitive and not strict about a trailing slash [confirmed: the plain router answers the same here].
    const cases = Router();
    cases.get('/api/cases', (_req, res) => void res.json({ from: 'cases' }));
    cases.get('/api/cases/:id', (req, res) => void res.json({ id: req.params.id }));
    const { plain, scopedApp, seen } = plainAndScoped(cases);
    for (const path of ['/api/patients', '/api/casework', '/health', '/api', '/']) {
      expect((await sameAnswer(plain, scopedApp, 'get', path)).status).toBe(404);
    }
    expect(seen.entered).toBe(0);
    for (const path of ['/api/cases', '/API/Cases', '/api/cases/', '/api/CASES/7']) {
      expect((await sameAnswer(plain, scopedApp, 'get', path)).status).toBe(200);
    }
    expect(seen.entered).toBe(4);
  });

  it('when a router has a route with one segment, then only requests for that segment enter it', async () => {
    // Express 5: a route path matches the whole request path, so '/api' answers '/api' and '/api/' but not
    // '/api/cases' [confirmed: the plain router answers the same here].
    const root = Router();
    root.get('/api', (_req, res) => void res.json({ from: 'root' }));
    const { plain, scopedApp, seen } = plainAndScoped(root);
    expect((await sameAnswer(plain, scopedApp, 'get', '/api/cases')).status).toBe(404);
    expect((await sameAnswer(plain, scopedApp, 'get', '/other')).status).toBe(404);
    expect(seen.entered).toBe(0);
    expect((await sameAnswer(plain, scopedApp, 'get', '/api')).body).toEqual({ from: 'root' });
    expect((await sameAnswer(plain, scopedApp, 'get', '/API/')).body).toEqual({ from: 'root' });
    expect(seen.entered).toBe(2);
  });

  it('when a route\'s first segment is a parameter, then every request enters and the route answers any first segment', async () => {
    // Doc comment: a route whose first two segments are not plain words lets a request of any path concern the router.
    const anyKind = Router();
    anyKind.get('/:kind/items', (req, res) => void res.json({ kind: req.params.kind }));
    const { plain, scopedApp, seen } = plainAndScoped(anyKind);
    expect((await sameAnswer(plain, scopedApp, 'get', '/reagents/items')).body).toEqual({ kind: 'reagents' });
    expect((await sameAnswer(plain, scopedApp, 'get', '/elsewhere')).status).toBe(404);
    expect(seen.entered).toBe(2);
  });

  it('when a route\'s segments hold a character other than a letter, digit or hyphen, then every request enters', async () => {
    // Doc comment: only plain words make a prefix; '/api/cases.csv' (Express 5: a literal dot) is not one.
    const exports = Router();
    exports.get('/api/cases.csv', (_req, res) => void res.type('text/csv').send('id\n'));
    const { plain, scopedApp, seen } = plainAndScoped(exports);
    expect((await sameAnswer(plain, scopedApp, 'get', '/api/cases.csv')).status).toBe(200);
    expect((await sameAnswer(plain, scopedApp, 'get', '/api/patients')).status).toBe(404);
    expect(seen.entered).toBe(2);
  });

  it('when a router has router-level middleware, then every request enters it', async () => {
    // Doc comment: router-level middleware may concern a request of any path.
    const withMiddleware = Router();
    withMiddleware.use((_req, res, next) => {
      res.setHeader('X-Seen-By', 'router');
      next();
    });
    withMiddleware.get('/api/runs', (_req, res) => void res.json({ from: 'runs' }));
    const { plain, scopedApp, seen } = plainAndScoped(withMiddleware);
    const elsewhere = await sameAnswer(plain, scopedApp, 'get', '/api/patients');
    expect(elsewhere.status).toBe(404);
    expect(elsewhere.headers['x-seen-by']).toBe('router');
    expect((await sameAnswer(plain, scopedApp, 'get', '/api/runs')).body).toEqual({ from: 'runs' });
    expect(seen.entered).toBe(2);
  });

  it('when requests come in, then the routes are read on the first request and not again', async () => {
    // Doc comment: "The routes are read on the first request, when every router has been built."
    const cases = Router();
    cases.get('/api/cases', (_req, res) => void res.json({ from: 'cases' }));
    const counted = countingRouter(cases);
    const app = express();
    app.use(scoped(counted.router));
    expect(counted.seen.stackReads).toBe(0);
    await request(app).get('/api/cases');
    expect(counted.seen.stackReads).toBe(1);
    await request(app).get('/api/cases');
    await request(app).get('/api/patients');
    expect(counted.seen.stackReads).toBe(1);
  });
});
