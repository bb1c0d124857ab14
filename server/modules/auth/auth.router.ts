import { Router, type Request } from 'express';
import type { Sequelize } from 'sequelize';
import { loginUser, type CristaePassport } from '../../auth/passport';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { changePasswordInputSchema, loginInputSchema, type SessionUser } from '@/schemas/user';
import { AppError } from '../../lib/errors';
import { route } from '../../lib/route';
import { recordAudit } from '../audit/audit.service';
import { changeOwnPassword } from '../users/users.service';

function authenticate(passport: CristaePassport, req: Request): Promise<SessionUser> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: SessionUser | false) => {
      if (err) reject(err);
      else if (!user) reject(new AppError('VALIDATION_FAILED', 'Enter your e-mail address and password'));
      else resolve(user);
    })(req);
  });
}

/** Opens the session for a checked user; passport 0.7 regenerates the session id, so a planted id is useless. */
function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
}

export function authRouter(
  sequelize: Sequelize,
  passport: CristaePassport,
  opts: { loginAttemptsPerWindow: number; secureCookie: boolean },
): Router {
  const r = Router();
  // Counts failed sign-ins per client address; successful ones are not counted. The address is req.ip, which
  // Express takes from X-Forwarded-For only when the proxy is trusted (TRUST_PROXY), so behind a reverse proxy
  // each client has its own count instead of everyone sharing the proxy's address.
  const limiter = rateLimit({
    windowMs: 15 * 60_000,
    limit: opts.loginAttemptsPerWindow,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => ipKeyGenerator(req.ip ?? 'unknown'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) =>
      next(new AppError('TOO_MANY_REQUESTS', 'Too many sign-in attempts from this address; wait 15 minutes')),
  });

  route(r, 'POST /api/auth/login', { body: loginInputSchema }, async (_in, req, res) => {
    // In production the session cookie is Secure (RFC 6265 §4.1.2.5): over plain HTTP the browser would drop it,
    // and the person would be "signed in" with no session, sent back to this page without a word. Say why instead,
    // before the password is checked.
    if (opts.secureCookie && !req.secure) {
      throw new AppError(
        'FORBIDDEN',
        'Signing in needs HTTPS: this request reached Cristae over plain HTTP, where the browser would not keep the sign-in. Open Cristae at its https:// address; behind a TLS proxy, the server needs TRUST_PROXY set so that it believes the proxy\'s X-Forwarded-Proto',
      );
    }
    const user = await authenticate(passport, req);
    await logIn(req, user);
    await recordAudit(user, { action: 'sign-in', entity: 'user', entityId: user.id });
    res.json({ user });
  }, limiter);

  // The person's own password: every other session of the account ends, this one continues under a new id.
  route(r, 'POST /api/auth/password', { body: changePasswordInputSchema }, async ({ body }, req, res) => {
    const account = await changeOwnPassword(sequelize, req.user!, body);
    await logIn(req, loginUser(account));
    res.status(204).end();
  }, limiter);

  route(r, 'POST /api/auth/logout', {}, async (_in, req, res) => {
    const user = req.user!;
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
    await recordAudit(user, { action: 'sign-out', entity: 'user', entityId: user.id });
    res.clearCookie('cristae.sid');
    res.status(204).end();
  });

  route(r, 'GET /api/auth/me', {}, (_in, req, res) => {
    res.json({ user: req.user });
  });
  return r;
}
