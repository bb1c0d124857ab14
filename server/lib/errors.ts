import { ZodError } from 'zod';
import { ForeignKeyConstraintError, UniqueConstraintError, ValidationError as SequelizeValidationError } from 'sequelize';
import type { ErrorBody, ErrorCode, FileIssue } from '@/schemas/error';
import { PlateImportError } from '../domain/plate-import/errors';
import { ControlCsvError, ReferenceStatsInputError } from '../domain/reference-stats/errors';

const defaultStatus: Record<ErrorCode, number> = {
  VALIDATION_FAILED: 400,
  MALFORMED_JSON: 400,
  FILE_REJECTED: 400,
  UNAUTHENTICATED: 401,
  BAD_CREDENTIALS: 401,
  ACCOUNT_LOCKED: 423,
  FORBIDDEN: 403,
  SECOND_DIRECTOR_REQUIRED: 403,
  PASSWORD_CHANGE_REQUIRED: 403,
  ORIGIN_REFUSED: 403,
  NOT_FOUND: 404,
  CONFLICT: 409,
  STALE_VERSION: 409,
  INVALID_STATE: 409,
  QC_NOT_ACCEPTED: 409,
  TOO_LARGE: 413,
  TOO_MANY_REQUESTS: 429,
  INTERNAL: 500,
};

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fields?: Record<string, string>;
  readonly issues?: FileIssue[];

  constructor(
    code: ErrorCode,
    message: string,
    opts: { status?: number; fields?: Record<string, string>; issues?: FileIssue[] } = {},
  ) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.status = opts.status ?? defaultStatus[code];
    this.fields = opts.fields;
    this.issues = opts.issues;
  }
}

export const notFound = (what: string, id?: string | number) =>
  new AppError('NOT_FOUND', id === undefined ? `${what} not found` : `${what} ${id} not found`);
export const forbidden = (message = 'Your role does not allow this') => new AppError('FORBIDDEN', message);
export const unauthenticated = () => new AppError('UNAUTHENTICATED', 'Please sign in');
export const passwordChangeRequired = () =>
  new AppError(
    'PASSWORD_CHANGE_REQUIRED',
    'Your password was set by an administrator. Choose your own password before doing anything else.',
  );
export const conflict = (message: string) => new AppError('CONFLICT', message);
export const invalidState = (message: string) => new AppError('INVALID_STATE', message);
export const badInput = (fields: Record<string, string>, message = 'Some fields are not valid') =>
  new AppError('VALIDATION_FAILED', message, { fields });
export const fileRejected = (message: string, issues: FileIssue[]) =>
  new AppError('FILE_REJECTED', message, { issues });
export const staleVersion = (what: string) =>
  new AppError(
    'STALE_VERSION',
    `This ${what} was changed by someone else since you opened it. Reload to see their change, then apply yours again.`,
  );

/** Flattens zod issues to one message per dotted field path (the first issue wins). */
export function zodFields(err: ZodError, prefix?: string): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    const parts = [...(prefix ? [prefix] : []), ...issue.path.map(String)];
    if (issue.code === 'unrecognized_keys') {
      for (const k of issue.keys) fields[[...parts, k].join('.')] ??= 'Unknown field';
      continue;
    }
    fields[parts.join('.') || '(body)'] ??= issue.message;
  }
  return fields;
}

function envelope(code: ErrorCode, message: string, extra: Partial<ErrorBody['error']> = {}): ErrorBody {
  return { error: { code, message, ...extra } };
}

type BodyParserError = Error & { type?: string; status?: number };
type MulterLikeError = Error & { code?: string; field?: string };

/** The one place that decides an HTTP status for an error. */
export function toHttpError(err: unknown): { status: number; body: ErrorBody } {
  if (err instanceof AppError) {
    return {
      status: err.status,
      body: envelope(err.code, err.message, {
        ...(err.fields ? { fields: err.fields } : {}),
        ...(err.issues ? { issues: err.issues } : {}),
      }),
    };
  }
  if (err instanceof PlateImportError) {
    const issues = err.issues.map((i) => ({
      row: i.row,
      column: i.column === null ? null : i.columnNumber ? `${i.column} (column ${i.columnNumber})` : i.column,
      message: i.message,
    }));
    return { status: 400, body: envelope('FILE_REJECTED', err.message, { issues }) };
  }
  if (err instanceof ControlCsvError) {
    return { status: 400, body: envelope('FILE_REJECTED', err.message, { issues: err.issues }) };
  }
  if (err instanceof ReferenceStatsInputError) {
    return { status: 400, body: envelope('VALIDATION_FAILED', err.message, { fields: { [err.field]: err.message } }) };
  }
  if (err instanceof ZodError) {
    return { status: 400, body: envelope('VALIDATION_FAILED', 'Some fields are not valid', { fields: zodFields(err) }) };
  }
  if (err instanceof UniqueConstraintError) {
    const fields = Object.fromEntries(
      (err.errors ?? []).map((e) => [e.path ?? 'record', `${e.path ?? 'Value'} is already in use`]),
    );
    return { status: 409, body: envelope('CONFLICT', 'A record with the same key already exists', { fields }) };
  }
  if (err instanceof ForeignKeyConstraintError) {
    return { status: 409, body: envelope('CONFLICT', 'The record is referenced by, or refers to, another record') };
  }
  if (err instanceof SequelizeValidationError) {
    const fields = Object.fromEntries(err.errors.map((e) => [e.path ?? 'record', e.message]));
    return { status: 400, body: envelope('VALIDATION_FAILED', 'Some fields are not valid', { fields }) };
  }
  const e = err as BodyParserError & MulterLikeError;
  if (e && e.type === 'entity.too.large') {
    return { status: 413, body: envelope('TOO_LARGE', 'The request body is larger than allowed') };
  }
  if (e && e.type === 'entity.parse.failed') {
    return { status: 400, body: envelope('MALFORMED_JSON', 'The request body is not valid JSON') };
  }
  if (e && e.name === 'MulterError') {
    if (e.code === 'LIMIT_FILE_SIZE') {
      return { status: 413, body: envelope('TOO_LARGE', `The file in "${e.field ?? 'file'}" is larger than allowed`) };
    }
    return {
      status: 400,
      body: envelope('VALIDATION_FAILED', `Upload problem: ${e.message}`, { fields: { [e.field ?? 'file']: e.message } }),
    };
  }
  if (e && typeof e.status === 'number' && e.status >= 400 && e.status < 500 && e.type) {
    return { status: e.status, body: envelope('VALIDATION_FAILED', 'The request could not be read') };
  }
  return { status: 500, body: envelope('INTERNAL', 'Something went wrong on the server; the error has been logged') };
}

const escapeHtml = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');

const pageHeadings: Partial<Record<number, string>> = {
  401: 'Please sign in first',
  403: 'This is not part of your role',
  404: 'Nothing at this address',
};

/**
 * A person who opens an API link in the browser (a GET that asks for HTML, as a browser's address bar does)
 * gets a short readable page with the same message instead of bare JSON; API clients, which ask for JSON or
 * anything, keep the JSON body. The status is the same either way.
 */
export function wantsErrorPage(method: string, accepts: (types: string[]) => string | false): boolean {
  return method === 'GET' && accepts(['json', 'html']) === 'html';
}

/** The small page of wantsErrorPage: heading, the error's message, and the way back. No script, no outside style. */
export function errorPage(status: number, body: ErrorBody): string {
  const heading = pageHeadings[status] ?? (status >= 500 ? 'Something went wrong' : 'This request could not be completed');
  const back = status === 401 ? '<a href="/sign-in">Sign in</a>' : '<a href="/">Back to Cristae</a>';
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(heading)} · Cristae</title></head>
<body><main><h1>${escapeHtml(heading)}</h1><p>${escapeHtml(body.error.message)}</p>
<p><small>Status ${status} · ${escapeHtml(body.error.code)}</small></p><p>${back}</p></main></body></html>`;
}
