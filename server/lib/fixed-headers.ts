import type { Request, RequestHandler, Response } from 'express';

type HeaderValue = number | string | readonly string[];

/**
 * The same response headers as `middleware` (helmet, say), worked out once instead of on every request. The
 * middleware is run once against a stand-in request and response that record what it sets and removes, in order
 * (a header set and then removed stays removed), and each request replays those calls; when it looks at the
 * request, does not finish at once, or does anything else with the response, its answer may differ between
 * requests, and the middleware itself is used unchanged.
 */
export function fixedHeaders(middleware: RequestHandler): RequestHandler {
  const steps: Array<(response: Response) => void> = [];
  let readsRequest = false;
  let finished = false;
  const req = new Proxy({} as Request, {
    get: () => {
      readsRequest = true;
      return undefined;
    },
  });
  const recorder = {
    setHeader: (name: string, value: HeaderValue) => void steps.push((response) => response.setHeader(name, value)),
    removeHeader: (name: string) => void steps.push((response) => response.removeHeader(name)),
  };
  const res = new Proxy(recorder as unknown as Response, {
    get: (target, key) => {
      if (key in recorder) return (target as unknown as Record<string | symbol, unknown>)[key];
      readsRequest = true;
      return undefined;
    },
  });
  try {
    void middleware(req, res, (err?: unknown) => {
      finished = err === undefined;
    });
  } catch {
    finished = false;
  }
  if (readsRequest || !finished) return middleware;
  return (_req, response, next) => {
    for (const step of steps) step(response);
    next();
  };
}
