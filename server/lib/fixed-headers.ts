import type { Request, RequestHandler, Response } from 'express';

type HeaderValue = number | string | readonly string[];

/**
 * The same response headers as `middleware` (helmet, say), worked out once instead of on every request. The
 * middleware is run once against a stand-in request and response that record what it sets and removes; when it
 * looks at the request, does not finish at once, or does anything else with the response, its answer may differ
 * between requests, and the middleware itself is used unchanged.
 */
export function fixedHeaders(middleware: RequestHandler): RequestHandler {
  const set: Array<[string, HeaderValue]> = [];
  const removed: string[] = [];
  let readsRequest = false;
  let finished = false;
  const req = new Proxy({} as Request, {
    get: () => {
      readsRequest = true;
      return undefined;
    },
  });
  const recorder = {
    setHeader: (name: string, value: HeaderValue) => void set.push([name, value]),
    removeHeader: (name: string) => void removed.push(name),
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
    for (const name of removed) response.removeHeader(name);
    for (const [name, value] of set) response.setHeader(name, value);
    next();
  };
}
