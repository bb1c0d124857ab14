import type { RequestHandler } from 'express';
import { AppError } from '../lib/errors';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

function originOf(value: string | undefined): string | undefined {
  if (!value) return undefined;
  try {
    return new URL(value).origin;
  } catch {
    return undefined;
  }
}

/**
 * CSRF defence: a state-changing request must come from one of the app's own origins, read from the Origin
 * header or, failing that, the Referer. A request carrying neither is refused too. The allowed origins are
 * serialised the way a browser serialises its own (RFC 6454 §6.2: host in lower case, no default port, no path),
 * so an APP_ORIGIN written as `https://Lab.Example/` or `https://lab.example:443` still matches.
 */
export function requireSameOrigin(allowed: string[]): RequestHandler {
  const ok = new Set(allowed.flatMap((o) => originOf(o) ?? []));
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const origin = originOf(req.get('origin')) ?? originOf(req.get('referer'));
    if (origin && ok.has(origin)) return next();
    next(
      new AppError(
        'ORIGIN_REFUSED',
        origin ? `Requests from ${origin} are not accepted` : 'The request does not say which site it came from',
      ),
    );
  };
}
