import type { z } from 'zod';
import { errorBodySchema, type ErrorCode, type FileIssue } from '@/schemas/error';

/** A failed API call, carrying the server's error code, message and per-field messages. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: ErrorCode;
  readonly fields: Record<string, string>;
  readonly issues: FileIssue[];

  constructor(status: number, code: ErrorCode, message: string, fields: Record<string, string> = {}, issues: FileIssue[] = []) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.fields = fields;
    this.issues = issues;
  }
}

type Options = { method?: string; body?: unknown; formData?: FormData; signal?: AbortSignal };

/** The only place in the client that calls fetch. Every request carries the session cookie. */
export async function apiRequest<T = unknown>(path: string, schema?: z.ZodType<T>, opts: Options = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  let body: BodyInit | undefined;
  if (opts.formData) body = opts.formData;
  else if (opts.body !== undefined) {
    headers['Content-Type'] = 'application/json';
    body = JSON.stringify(opts.body);
  }
  const res = await fetch(path, {
    method: opts.method ?? (body ? 'POST' : 'GET'),
    headers,
    body,
    credentials: 'same-origin',
    signal: opts.signal,
  });
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = null;
  }
  if (!res.ok) {
    const parsed = errorBodySchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new ApiError(res.status, e.code, e.message, e.fields, e.issues);
    }
    throw new ApiError(res.status, 'INTERNAL', `The server answered ${res.status}`);
  }
  return schema ? schema.parse(json) : (json as T);
}

export const api = {
  get: <T>(path: string, schema?: z.ZodType<T>) => apiRequest(path, schema),
  post: <T>(path: string, body: unknown, schema?: z.ZodType<T>) => apiRequest(path, schema, { method: 'POST', body }),
  put: <T>(path: string, body: unknown, schema?: z.ZodType<T>) => apiRequest(path, schema, { method: 'PUT', body }),
  patch: <T>(path: string, body: unknown, schema?: z.ZodType<T>) => apiRequest(path, schema, { method: 'PATCH', body }),
  del: <T>(path: string, schema?: z.ZodType<T>) => apiRequest(path, schema, { method: 'DELETE' }),
  upload: <T>(path: string, formData: FormData, schema?: z.ZodType<T>) =>
    apiRequest(path, schema, { method: 'POST', formData }),
};

/** The multipart body of a plate upload: the plan as JSON text in "plan", then the file in "file". */
export function planAndFile({ file, plan }: { file: File; plan: unknown }): FormData {
  const form = new FormData();
  form.append('plan', JSON.stringify(plan));
  form.append('file', file, file.name);
  return form;
}

/** Builds a query string from defined values only. */
export function toQuery(params: Record<string, string | number | boolean | undefined | null>): string {
  const sp = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') sp.set(k, String(v));
  const s = sp.toString();
  return s ? `?${s}` : '';
}
