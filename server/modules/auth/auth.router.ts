import { Router, type Request } from 'express';
import type { CristaePassport } from '../../auth/passport';
import { rateLimit } from 'express-rate-limit';
import { loginInputSchema, type User } from '@/schemas/user';
import { AppError } from '../../lib/errors';
import { route } from '../../lib/route';
import { recordAudit } from '../audit/audit.service';

function authenticate(passport: CristaePassport, req: Request): Promise<User> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: User | false) => {
      if (err) reject(err);
      else if (!user) reject(new AppError('VALIDATION_FAILED', 'Enter your e-mail address and password'));
      else resolve(user);
    })(req);
  });
}

export function authRouter(passport: CristaePassport, opts: { loginAttemptsPerWindow: number }): Router {
  const r = Router();
  // Counts failed sign-ins per client address; successful ones are not counted.
  const limiter = rateLimit({
    windowMs: 15 * 60_000,
    limit: opts.loginAttemptsPerWindow,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) =>
      next(new AppError('TOO_MANY_REQUESTS', 'Too many sign-in attempts from this address; wait 15 minutes')),
  });

  route(r, 'POST /api/auth/login', { body: loginInputSchema }, async (_in, req, res) => {
    const user = await authenticate(passport, req);
    // passport 0.7 regenerates the session id inside req.login, so a planted id cannot be reused.
    await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
    await recordAudit(user, { action: 'sign-in', entity: 'user', entityId: user.id });
    res.json({ user });
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
