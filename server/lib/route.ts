import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type { z } from 'zod';
import { allows, openBeforePasswordChange, permissions, type RouteKey } from '../auth/permissions';
import { AppError, forbidden, passwordChangeRequired, unauthenticated, zodFields } from './errors';

type Schemas = { params?: z.ZodType; query?: z.ZodType; body?: z.ZodType };
type Parsed<S extends Schemas> = {
  params: S['params'] extends z.ZodType ? z.infer<S['params']> : Record<string, string>;
  query: S['query'] extends z.ZodType ? z.infer<S['query']> : Record<string, unknown>;
  body: S['body'] extends z.ZodType ? z.infer<S['body']> : undefined;
};

export type Handler<S extends Schemas> = (input: Parsed<S>, req: Request, res: Response) => unknown;

/** Keys registered so far in this process: lets a test prove the table and the routes agree. */
export const registeredRouteKeys = new Set<RouteKey>();

export function splitKey(key: RouteKey): { method: 'get' | 'post' | 'put' | 'patch' | 'delete'; path: string } {
  const [method, path] = key.split(' ') as [string, string];
  return { method: method.toLowerCase() as 'get', path };
}

/**
 * Enforces the permissions table for one route: 401 with no session, 403 PASSWORD_CHANGE_REQUIRED while a reset
 * password has not been replaced, 403 for a role not listed.
 */
export function authorize(key: RouteKey): RequestHandler {
  const access = permissions[key];
  return (req, _res, next) => {
    if (access === 'public') return next();
    if (!req.user) return next(unauthenticated());
    if (req.user.mustChangePassword && !openBeforePasswordChange.has(key)) return next(passwordChangeRequired());
    if (!allows(access, req.user.role)) return next(forbidden());
    next();
  };
}

function parsePart(schema: z.ZodType | undefined, value: unknown, part: string): unknown {
  if (!schema) return value;
  const result = schema.safeParse(value ?? (part === 'body' ? undefined : {}));
  if (result.success) return result.data;
  throw new AppError('VALIDATION_FAILED', `The request ${part} is not valid`, {
    fields: zodFields(result.error),
  });
}

/**
 * Registers one API route: access from the permissions table, then each part parsed with its shared schema,
 * then the handler with the parsed values; any throw or rejection goes to the error middleware.
 */
export function route<S extends Schemas>(
  router: Router,
  key: RouteKey,
  schemas: S,
  handler: Handler<S>,
  ...before: RequestHandler[]
): void {
  const { method, path } = splitKey(key);
  registeredRouteKeys.add(key);
  router[method](path, authorize(key), ...before, async (req: Request, res: Response, next: NextFunction) => {
    try {
      const input = {
        params: parsePart(schemas.params, req.params, 'params'),
        query: parsePart(schemas.query, req.query, 'query'),
        body: parsePart(schemas.body, req.body, 'body'),
      } as Parsed<S>;
      await handler(input, req, res);
    } catch (err) {
      next(err);
    }
  });
}
