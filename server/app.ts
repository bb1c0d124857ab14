import fs from 'node:fs';
import path from 'node:path';
import express, { type ErrorRequestHandler, type Express } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import connectSessionSequelize from 'connect-session-sequelize';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config';
import { requireSameOrigin } from './auth/origin-check';
import { createPassport, sessionUsers } from './auth/passport';
import { errorPage, notFound, toHttpError, wantsErrorPage } from './lib/errors';
import { cacheSessionReads, extendSessions, SHARED_SESSION_CACHE_MS } from './auth/session-cache';
import { serveClient, serveClientIndex } from './client-assets';
import { logError } from './lib/log';
import { route } from './lib/route';
import { scoped } from './lib/scoped-router';
import { fixedHeaders } from './lib/fixed-headers';
import { limitReadsWhileWriting } from './lib/read-gate';
import { assayDefinitionsRouter } from './modules/assay-definitions/assay-definitions.router';
import { auditRouter } from './modules/audit/audit.router';
import { authRouter } from './modules/auth/auth.router';
import { casesRouter } from './modules/cases/cases.router';
import { labProfileRouter } from './modules/lab-profile/lab-profile.router';
import { patientsRouter } from './modules/patients/patients.router';
import { referenceIntervalsRouter } from './modules/reference-intervals/reference-intervals.router';
import { qcRouter } from './modules/qc/qc.router';
import { specimensRouter } from './modules/specimens/specimens.router';
import { usersRouter } from './modules/users/users.router';
import { measurementsRouter } from './modules/measurements/measurements.router';
import { plateMapsRouter } from './modules/plate-maps/plate-maps.router';
import { resultsRouter } from './modules/results/results.router';
import { uploadsRouter } from './modules/uploads/uploads.router';
import { runsRouter } from './modules/runs/runs.router';
import { createDisabledMailer, type Mailer } from './modules/mail/mailer';
import { mailRouter } from './modules/mail/mail.router';
import { reportsRouter } from './modules/reports/reports.router';
import { reviewRouter } from './modules/review/review.router';
import { registryRouter } from './modules/registry/registry.router';
import { registryExportRouter } from './modules/registry/export.router';

export type AppOptions = {
  sequelize: Sequelize;
  config: AppConfig;
  /** Built client to serve; omitted in API tests. */
  clientDir?: string;
  /** Failed sign-ins allowed per client address per 15 minutes. */
  loginAttemptsPerWindow?: number;
  /** Periodically delete expired sessions (off in tests, whose databases live only as long as the test). */
  expireSessions?: boolean;
  /** Sends the report notices; without one, notices are recorded as not sent (no mail server). */
  mailer?: Mailer;
  /** API reads worked on at once while writes are in flight (server/lib/read-gate.ts). */
  readConcurrency?: number;
};

export const JSON_BODY_LIMIT = '256kb';

/** Builds the configured Express app without listening, so tests can drive it with supertest. */
export function createApp(opts: AppOptions): Express {
  const { sequelize, config } = opts;
  const app = express();
  app.disable('x-powered-by');
  // API answers carry patients' data, and no cache may keep them (Cache-Control: no-store below), so Express's
  // default ETag (a SHA-1 of every answer's body) buys nothing. A route that serves a stored file with a validator
  // of its own (a report's PDF, its SHA-256) sets ETag and Cache-Control itself, and Express still answers 304.
  app.set('etag', false);
  // Behind a TLS proxy (TRUST_PROXY), req.secure and req.ip come from X-Forwarded-Proto/-For, so the Secure
  // session cookie is set and per-address limits see the real client.
  app.set('trust proxy', config.trustProxy);

  // Helmet's headers are the same for every answer: worked out once (server/lib/fixed-headers.ts).
  const securityHeaders = helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        styleSrc: ["'self'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'"],
        connectSrc: ["'self'"],
        objectSrc: ["'none'"],
        frameSrc: ["'self'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'self'"],
      },
    },
  });
  app.use(fixedHeaders(securityHeaders));

  const SequelizeStore = connectSessionSequelize(session.Store);
  const store = new SequelizeStore({
    db: sequelize,
    tableName: 'Sessions',
    checkExpirationInterval: opts.expireSessions ? 15 * 60_000 : undefined,
    expiration: 8 * 60 * 60_000,
  });
  if (!opts.expireSessions) store.stopExpiringSessions();
  // Several application processes may share a PostgreSQL database: re-read a cached session after a few seconds.
  cacheSessionReads(store, { maxAgeMs: sequelize.getDialect() === 'postgres' ? SHARED_SESSION_CACHE_MS : Infinity });

  // The built client is answered before any API middleware (no session, body parsing or routing for assets).
  const client = opts.clientDir && fs.existsSync(path.join(opts.clientDir, 'index.html')) ? opts.clientDir : null;
  if (client) app.use(serveClient(client));

  // RFC 9111 §5.2.2.5: no-store keeps every answer out of the browser's and any proxy's cache (on disk, on shared
  // machines); OWASP ASVS 4.0 V8.2.1 asks for it on sensitive data [from memory]. A route may set its own.
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', requireSameOrigin(config.allowedOrigins));
  // One read at a time while writes wait: with SQLite statements kept prepared a case list costs about 2 ms of the
  // event loop, and two in flight took the writers' share (20 writers + 20 readers, interleaved: write p95 about
  // 330 ms with two, 255 ms with one; read p95 about 80 ms with two, 115 ms with one).
  app.use('/api', limitReadsWhileWriting(opts.readConcurrency ?? 1));
  app.use('/api', express.json({ limit: JSON_BODY_LIMIT }));
  app.use(
    '/api',
    session({
      name: 'cristae.sid',
      secret: config.sessionSecret,
      store,
      resave: false,
      saveUninitialized: false,
      // Rolling expiry in coarse steps (extendSessions): the cookie is not re-signed and re-sent on every answer.
      rolling: false,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.env === 'production',
        maxAge: 8 * 60 * 60_000,
      },
    }),
  );
  app.use('/api', extendSessions());
  const passport = createPassport(sequelize);
  app.use('/api', sessionUsers(app, passport));

  const health = express.Router();
  route(health, 'GET /api/health', {}, (_in, _req, res) => {
    res.json({ status: 'ok' });
  });
  app.use(scoped(health));
  app.use(scoped(authRouter(sequelize, passport, { loginAttemptsPerWindow: opts.loginAttemptsPerWindow ?? 20, secureCookie: config.env === 'production' })));
  app.use(scoped(usersRouter(sequelize)));
  app.use(scoped(labProfileRouter(sequelize)));
  app.use(scoped(auditRouter()));
  app.use(scoped(assayDefinitionsRouter(sequelize)));
  app.use(scoped(patientsRouter(sequelize)));
  app.use(scoped(casesRouter(sequelize)));
  app.use(scoped(specimensRouter(sequelize)));
  app.use(scoped(referenceIntervalsRouter(sequelize)));
  app.use(scoped(qcRouter(sequelize)));
  app.use(scoped(runsRouter(sequelize)));

  const mailer = opts.mailer ?? createDisabledMailer(config.mail.from);
  app.use(scoped(reportsRouter(sequelize, { publicOrigin: config.publicOrigin })));
  app.use(scoped(reviewRouter(sequelize)));
  app.use(scoped(mailRouter(sequelize, mailer)));

  app.use(scoped(measurementsRouter(sequelize)));
  app.use(scoped(uploadsRouter(sequelize)));
  app.use(scoped(plateMapsRouter(sequelize)));
  app.use(scoped(resultsRouter(sequelize)));
  app.use(scoped(registryRouter(sequelize)));
  app.use(scoped(registryExportRouter(sequelize)));

  app.use('/api', (req, _res, next) => next(notFound('API route', `${req.method} ${req.path}`)));

  if (client) app.get('/{*splat}', serveClientIndex(client));

  const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
    const { status, body } = toHttpError(err);
    if (status >= 500) logError(err, `${req.method} ${req.originalUrl}`);
    if (res.headersSent) return;
    if (wantsErrorPage(req.method, (types) => req.accepts(types))) {
      res.status(status).type('html').send(errorPage(status, body));
      return;
    }
    res.status(status).json(body);
  };
  app.use(errorHandler);
  return app;
}
