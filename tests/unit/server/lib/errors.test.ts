import express, { type ErrorRequestHandler } from 'express';
import multer from 'multer';
import { ForeignKeyConstraintError, UniqueConstraintError, ValidationError, ValidationErrorItem } from 'sequelize';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { ControlCsvError, ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import {
  AppError,
  badInput,
  conflict,
  errorPage,
  fileRejected,
  forbidden,
  invalidState,
  notFound,
  passwordChangeRequired,
  staleVersion,
  toHttpError,
  unauthenticated,
  wantsErrorPage,
  zodFields,
} from '../../../../server/lib/errors';

/*
 * server/lib/errors.ts is the one place an error becomes an HTTP answer. Statuses are checked against their
 * definitions: RFC 9110 §15.5 (400, 401, 403, 404, 409, 413) [confirmed], RFC 6585 §4 (429) [confirmed],
 * RFC 4918 §11.3 (423 Locked) [confirmed]; the errors fed in are made by the libraries themselves (zod, Sequelize,
 * multer, Express's body parser), not written by hand.
 */

describe('AppError statuses', () => {
  it.each([
    ['VALIDATION_FAILED', 400],
    ['MALFORMED_JSON', 400],
    ['FILE_REJECTED', 400],
    ['UNAUTHENTICATED', 401],
    ['BAD_CREDENTIALS', 401],
    ['FORBIDDEN', 403],
    ['SECOND_DIRECTOR_REQUIRED', 403],
    ['PASSWORD_CHANGE_REQUIRED', 403],
    ['ORIGIN_REFUSED', 403],
    ['NOT_FOUND', 404],
    ['CONFLICT', 409],
    ['STALE_VERSION', 409],
    ['INVALID_STATE', 409],
    ['QC_NOT_ACCEPTED', 409],
    ['TOO_LARGE', 413],
    ['ACCOUNT_LOCKED', 423],
    ['TOO_MANY_REQUESTS', 429],
    ['INTERNAL', 500],
  ] as const)('%s answers %i unless told otherwise', (code, status) => {
    // [confirmed] the RFCs above: a refused credential is 401, a refused role 403, a state conflict 409.
    const err = new AppError(code, 'm');
    expect(err).toBeInstanceOf(Error);
    expect([err.name, err.code, err.status, err.message]).toEqual(['AppError', code, status, 'm']);
    expect(new AppError(code, 'm', { status: 418 }).status).toBe(418);
  });

  it('the helpers name what they refuse', () => {
    // [common practice] a clear message naming the record (house rule: errors name the field, row or record).
    expect(notFound('Case', 17)).toMatchObject({ code: 'NOT_FOUND', status: 404, message: 'Case 17 not found' });
    expect(notFound('Case', 0).message).toBe('Case 0 not found');
    expect(notFound('Report').message).toBe('Report not found');
    expect(forbidden()).toMatchObject({ code: 'FORBIDDEN', status: 403 });
    expect(forbidden().message).toMatch(/role/);
    expect(forbidden('Only the author').message).toBe('Only the author');
    expect(unauthenticated()).toMatchObject({ code: 'UNAUTHENTICATED', status: 401 });
    expect(unauthenticated().message).toMatch(/sign in/i);
    expect(passwordChangeRequired()).toMatchObject({ code: 'PASSWORD_CHANGE_REQUIRED', status: 403 });
    expect(passwordChangeRequired().message).toMatch(/password/);
    expect(conflict('taken')).toMatchObject({ code: 'CONFLICT', status: 409, message: 'taken' });
    expect(invalidState('already signed')).toMatchObject({ code: 'INVALID_STATE', status: 409, message: 'already signed' });
    expect(badInput({ email: 'Required' })).toMatchObject({ code: 'VALIDATION_FAILED', status: 400, fields: { email: 'Required' } });
    expect(badInput({ email: 'Required' }).message).toMatch(/not valid/);
    expect(badInput({}, 'Custom').message).toBe('Custom');
    const issues = [{ row: 3, column: 'B', message: 'not a number' }];
    expect(fileRejected('bad file', issues)).toMatchObject({ code: 'FILE_REJECTED', status: 400, issues });
    const stale = staleVersion('case');
    expect(stale).toMatchObject({ code: 'STALE_VERSION', status: 409 });
    expect(stale.message).toMatch(/^This case was changed by someone else/);
  });
});

describe('zodFields', () => {
  const schema = z
    .object({ name: z.string().min(2, 'too short'), patient: z.object({ sex: z.enum(['F', 'M'], 'F or M') }) })
    .strict();
  it('names each failing field by its dotted path, one message each, and each unknown key', () => {
    // [confirmed] zod 4 issue paths; house rule: a 400 names the field.
    const err = schema.safeParse({ name: 'x', patient: { sex: 'Q' }, extra: 1, other: 2 }).error!;
    expect(zodFields(err)).toEqual({ name: 'too short', 'patient.sex': 'F or M', extra: 'Unknown field', other: 'Unknown field' });
    expect(zodFields(err, 'body')).toEqual({
      'body.name': 'too short',
      'body.patient.sex': 'F or M',
      'body.extra': 'Unknown field',
      'body.other': 'Unknown field',
    });
  });
  it('keeps the first message when a field fails twice, and names the whole body "(body)" when it is not an object', () => {
    const twice = z.string().min(5, 'first').regex(/^\d+$/, 'second');
    expect(zodFields(z.object({ code: twice }).safeParse({ code: 'ab' }).error!)).toEqual({ code: 'first' });
    expect(Object.keys(zodFields(schema.safeParse('text').error!))).toEqual(['(body)']);
  });
  it('an unknown key inside a nested object is named with its path', () => {
    const nested = z.object({ patient: z.object({ sex: z.string() }).strict() });
    expect(zodFields(nested.safeParse({ patient: { sex: 'F', age: 3 } }).error!)).toEqual({ 'patient.age': 'Unknown field' });
  });
});

/** A Sequelize error item (its type declarations also ask for the model instance and validator, unused here). */
const item = (message: string, type: 'unique violation' | 'notnull violation' | 'validation error', path: string | null, value: string | null) =>
  new ValidationErrorItem(message, type, path as string, value as string, undefined as never, undefined as never, undefined as never, []);

/** Runs an error through a tiny Express app so body-parser errors are the library's own. */
function appWith(throwing: express.RequestHandler, ...before: express.RequestHandler[]) {
  const app = express();
  app.post('/x', ...before, throwing);
  const handler: ErrorRequestHandler = (err, _req, res, _next) => {
    const { status, body } = toHttpError(err);
    res.status(status).json(body);
  };
  app.use(handler);
  return app;
}

describe('toHttpError', () => {
  it('an AppError keeps its status and code, and carries fields or issues only when it has them', () => {
    expect(toHttpError(new AppError('CONFLICT', 'c'))).toEqual({ status: 409, body: { error: { code: 'CONFLICT', message: 'c' } } });
    expect(toHttpError(badInput({ a: 'b' }, 'm')).body).toEqual({ error: { code: 'VALIDATION_FAILED', message: 'm', fields: { a: 'b' } } });
    const issues = [{ row: null, column: null, message: 'empty' }];
    expect(toHttpError(fileRejected('f', issues)).body).toEqual({ error: { code: 'FILE_REJECTED', message: 'f', issues } });
  });

  it('a plate file problem is 400 FILE_REJECTED naming row and column, with the column number when known', () => {
    const err = new PlateImportError([
      { code: 'NOT_A_NUMBER', row: 4, column: 'B3', columnNumber: 7, message: 'not a number' },
      { code: 'NOT_A_NUMBER', row: 5, column: 'C1', columnNumber: null, message: 'x' },
      { code: 'NOT_A_NUMBER', row: null, column: null, columnNumber: null, message: 'y' },
      // A column whose header cell is empty has no name to give (the message names its number): column stays null
      // and the word "null" is never written into the column.
      { code: 'EMPTY_COLUMN_NAME', row: 1, column: null, columnNumber: 3, message: 'Column 3 has no name' },
    ] as never);
    const { status, body } = toHttpError(err);
    expect(status).toBe(400);
    expect(body.error.code).toBe('FILE_REJECTED');
    expect(body.error.message).toBe(err.message);
    expect(body.error.issues).toEqual([
      { row: 4, column: 'B3 (column 7)', message: 'not a number' },
      { row: 5, column: 'C1', message: 'x' },
      { row: null, column: null, message: 'y' },
      { row: 1, column: null, message: 'Column 3 has no name' },
    ]);
  });

  it('control-data and statistics input problems are 400, naming their issues or field', () => {
    const issues = [{ row: 2, column: 'value', message: 'not a number' }];
    const csv = toHttpError(new ControlCsvError(issues as never));
    expect(csv).toEqual({ status: 400, body: { error: { code: 'FILE_REJECTED', message: expect.stringContaining('not a number'), issues } } });
    const stats = toHttpError(new ReferenceStatsInputError('values', 'at least 20 values'));
    expect(stats).toEqual({
      status: 400,
      body: { error: { code: 'VALIDATION_FAILED', message: 'at least 20 values', fields: { values: 'at least 20 values' } } },
    });
  });

  it('a zod error is 400 naming the fields', () => {
    const err = z.object({ n: z.number() }).safeParse({ n: 'x' }).error!;
    const { status, body } = toHttpError(err);
    expect(status).toBe(400);
    expect(body.error.code).toBe('VALIDATION_FAILED');
    expect(body.error.message).toMatch(/not valid/);
    expect(Object.keys(body.error.fields!)).toEqual(['n']);
  });

  it('database constraint errors are 409 (unique, foreign key) or 400 (validation), naming the column', () => {
    // [confirmed] RFC 9110 §15.5.10: 409 for a conflict with the current state of the resource.
    const unique = new UniqueConstraintError({ errors: [item('must be unique', 'unique violation', 'email', 'a@b.test')] });
    const u = toHttpError(unique);
    expect(u.status).toBe(409);
    expect(u.body.error).toMatchObject({ code: 'CONFLICT', fields: { email: 'email is already in use' } });
    expect(u.body.error.message).toMatch(/same key/);
    const anonymous = new UniqueConstraintError({ errors: [item('dup', 'unique violation', null, 'v')] });
    expect(toHttpError(anonymous).body.error.fields).toEqual({ record: 'Value is already in use' });
    expect(toHttpError(new UniqueConstraintError({})).body.error.fields).toEqual({});
    const fk = toHttpError(new ForeignKeyConstraintError({}));
    expect(fk.status).toBe(409);
    expect(fk.body.error.code).toBe('CONFLICT');
    expect(fk.body.error.message).toMatch(/referenced/);
    const invalid = toHttpError(new ValidationError('bad', [item('Name is required', 'notnull violation', 'name', null)]));
    expect(invalid).toEqual({ status: 400, body: { error: { code: 'VALIDATION_FAILED', message: expect.stringMatching(/not valid/), fields: { name: 'Name is required' } } } });
    const unnamed = toHttpError(new ValidationError('bad', [item('broken', 'validation error', null, null)]));
    expect(unnamed.body.error.fields).toEqual({ record: 'broken' });
  });

  it('a body over the JSON limit is 413 TOO_LARGE and malformed JSON is 400 MALFORMED_JSON (the body parser\'s own errors)', async () => {
    // [from memory] body-parser marks these errors with type 'entity.too.large' (413) and 'entity.parse.failed' (400).
    const app = appWith((_req, res) => void res.json({ ok: true }), express.json({ limit: '20b' }));
    const big = await request(app).post('/x').set('Content-Type', 'application/json').send(JSON.stringify({ a: 'x'.repeat(50) }));
    expect(big.status).toBe(413);
    expect(big.body.error.code).toBe('TOO_LARGE');
    expect(big.body.error.message).toMatch(/larger than allowed/);
    const broken = await request(app).post('/x').set('Content-Type', 'application/json').send('{"a":');
    expect(broken.status).toBe(400);
    expect(broken.body.error.code).toBe('MALFORMED_JSON');
    expect(broken.body.error.message).toMatch(/not valid JSON/);
    // Another body-parser refusal keeps its own 4xx status: 415 for a charset it cannot decode (RFC 9110 §15.5.16).
    const charset = await request(app).post('/x').set('Content-Type', 'application/json; charset=klingon').send('{}');
    expect(charset.status).toBe(415);
    expect(charset.body.error).toEqual({ code: 'VALIDATION_FAILED', message: 'The request could not be read' });
  });

  it('an upload over the size limit is 413 naming the field; another upload problem is 400 naming it', () => {
    // [from memory] multer's MulterError codes LIMIT_FILE_SIZE and LIMIT_UNEXPECTED_FILE.
    const size = toHttpError(new multer.MulterError('LIMIT_FILE_SIZE', 'plate'));
    expect(size.status).toBe(413);
    expect(size.body.error).toMatchObject({ code: 'TOO_LARGE' });
    expect(size.body.error.message).toContain('"plate"');
    const noField = toHttpError(Object.assign(new multer.MulterError('LIMIT_FILE_SIZE'), { field: undefined }));
    expect(noField.body.error.message).toContain('"file"');
    const other = toHttpError(new multer.MulterError('LIMIT_UNEXPECTED_FILE', 'photo'));
    expect(other.status).toBe(400);
    expect(other.body.error.code).toBe('VALIDATION_FAILED');
    expect(other.body.error.message).toMatch(/^Upload problem: /);
    expect(other.body.error.fields).toEqual({ photo: other.body.error.message.replace('Upload problem: ', '') });
    const otherNoField = toHttpError(Object.assign(new multer.MulterError('LIMIT_FIELD_COUNT'), { field: undefined }));
    expect(Object.keys(otherNoField.body.error.fields!)).toEqual(['file']);
  });

  it('a library error with a 4xx status is passed on only with a type and only inside 400..499; everything else is 500', () => {
    // [confirmed] RFC 9110 §15.5: 4xx is 400 to 499; an unknown failure is the server's (500, §15.6.1).
    const lib = (status: number, type?: string) => Object.assign(new Error('x'), { status, type });
    expect(toHttpError(lib(400, 'some.type')).status).toBe(400);
    expect(toHttpError(lib(499, 'some.type')).status).toBe(499);
    expect(toHttpError(lib(399, 'some.type')).status).toBe(500);
    expect(toHttpError(lib(500, 'some.type')).status).toBe(500);
    // 500 and 503 are 5xx, not the client's fault (RFC 9110 §15.6), so they are the server's own INTERNAL answer.
    expect(toHttpError(lib(500, 'some.type')).body.error.code).toBe('INTERNAL');
    expect(toHttpError(lib(503, 'some.type'))).toEqual(toHttpError(new Error('boom')));
    expect(toHttpError(lib(404)).status).toBe(500);
    expect(toHttpError(Object.assign(new Error('x'), { status: '404', type: 't' })).status).toBe(500);
    for (const thrown of [new Error('boom'), null, undefined, 'text', 42]) {
      const r = toHttpError(thrown);
      expect(r.status).toBe(500);
      expect(r.body.error.code).toBe('INTERNAL');
      expect(r.body.error.message).toMatch(/went wrong/);
    }
  });
});

describe('error pages for a browser', () => {
  /** wantsErrorPage fed by Express's own content negotiation (req.accepts). */
  const negotiated = (method: 'get' | 'post', accept: string) => {
    const app = express();
    app.all('/p', (req, res) => void res.json(wantsErrorPage(req.method, (types) => req.accepts(types))));
    return request(app)[method]('/p').set('Accept', accept).then((r) => r.body as boolean);
  };
  it('only a GET that prefers HTML gets a page; */* and JSON get JSON', async () => {
    // [confirmed] RFC 9110 §12.5.1 Accept; [from memory] Express req.accepts picks the first listed type on a tie.
    expect(await negotiated('get', 'text/html,application/xhtml+xml,*/*;q=0.8')).toBe(true);
    expect(await negotiated('get', '*/*')).toBe(false);
    expect(await negotiated('get', 'application/json')).toBe(false);
    expect(await negotiated('post', 'text/html')).toBe(false);
  });

  const body = (message: string, code = 'NOT_FOUND') => ({ error: { code, message } }) as never;
  it('a page has a heading for the status, the message escaped, and the way back', () => {
    // [confirmed] OWASP XSS Prevention Cheat Sheet, rule 1: encode & < > " ' before putting text into HTML.
    const html = errorPage(404, body(`<img src=x onerror="alert('1')"> & more`));
    expect(html).toContain('<h1>Nothing at this address</h1>');
    expect(html).toContain('<title>Nothing at this address · Cristae</title>');
    expect(html).toContain('&lt;img src=x onerror=&quot;alert(&#39;1&#39;)&quot;&gt; &amp; more');
    expect(html).not.toContain('<img');
    expect(html).toContain('Status 404 · NOT_FOUND');
    expect(html).toContain('<a href="/">Back to Cristae</a>');
    expect(html.startsWith('<!doctype html>')).toBe(true);
  });
  it.each([
    [401, 'Please sign in first', '<a href="/sign-in">Sign in</a>'],
    [403, 'This is not part of your role', '<a href="/">Back to Cristae</a>'],
    [400, 'This request could not be completed', '<a href="/">'],
    [499, 'This request could not be completed', '<a href="/">'],
    [500, 'Something went wrong', '<a href="/">'],
    [503, 'Something went wrong', '<a href="/">'],
  ])('status %i: heading %j and link %j', (status, heading, link) => {
    const html = errorPage(status, body('m', 'X'));
    expect(html).toContain(`<h1>${heading}</h1>`);
    expect(html).toContain(link);
    expect(html.includes('/sign-in')).toBe(status === 401);
  });
  it('escapes the code and the heading as well', () => {
    expect(errorPage(400, body('m', '<b>'))).toContain('· &lt;b&gt;</small>');
  });
});
