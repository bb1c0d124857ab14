import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import type { Express } from 'express';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { migrate } from '../../server/db/migrate';
import { initModels } from '../../server/db/models';
import { seedDemoIfEmpty } from '../../server/db/seed/demo';
import { openDatabase } from '../../server/db/sequelize';
import { ensureDefaultDefinitions } from '../../server/modules/assay-definitions/assay-definitions.service';
import { buildPatientInput, buildRegisterCaseInput, clinicianIds } from '../factories/cases';

/*
 * The request path over a SQLite file (WAL, several connections), as the server runs it: the built client's
 * compression and caching headers, a session that is not re-signed or re-written on every request, and writes
 * fired in parallel that are all present once acknowledged.
 */

const ORIGIN = 'http://localhost:3000';
const PASSWORD = 'cristae-demo';
let dir: string;
let sequelize: Sequelize;
let app: Express;
let clientApp: Express;

/** A bundle big enough to be worth compressing (the compression middleware skips bodies under 1 kB). */
const bundle = Array.from({ length: 400 }, (_, i) => `export const value${i} = "respiratory chain ${i}";`).join('\n');

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-request-path-'));
  sequelize = await openDatabase(path.join(dir, 'cristae.sqlite'));
  initModels(sequelize);
  await migrate(sequelize);
  await ensureDefaultDefinitions(sequelize);
  await seedDemoIfEmpty(sequelize, PASSWORD);
  const config = loadConfig({ NODE_ENV: 'test', PORT: '3000', DEMO_PASSWORD: PASSWORD });
  app = createApp({ sequelize, config, loginAttemptsPerWindow: 1000 });

  const client = path.join(dir, 'client');
  fs.mkdirSync(path.join(client, 'assets'), { recursive: true });
  fs.writeFileSync(path.join(client, 'index.html'), '<!doctype html><title>Cristae</title><script src="/assets/index-Ab12Cd34.js"></script>');
  fs.writeFileSync(path.join(client, 'assets', 'index-Ab12Cd34.js'), bundle);
  fs.writeFileSync(path.join(client, 'cristae.svg'), `<svg xmlns="http://www.w3.org/2000/svg">${'<g/>'.repeat(400)}</svg>`);
  clientApp = createApp({ sequelize, config, clientDir: client });
}, 180_000);

afterAll(async () => {
  await sequelize.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

afterEach(() => {
  vi.useRealTimers();
});

/** The raw bytes and headers of one GET, without any client-side decoding (node:http does none). */
async function rawGet(target: Express, urlPath: string, headers: Record<string, string>) {
  const server = http.createServer(target);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  try {
    const { port } = server.address() as { port: number };
    return await new Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }>((resolve, reject) => {
      http
        .get({ host: '127.0.0.1', port, path: urlPath, headers }, (res) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) }));
        })
        .on('error', reject);
    });
  } finally {
    await new Promise((resolve) => server.close(resolve));
  }
}

describe('the built client: compression and caching', () => {
  // Content codings: RFC 9110 §8.4 and §12.5.3 (Accept-Encoding), Vary §12.5.5 [confirmed]; brotli RFC 7932 and
  // gzip RFC 1952, decoded here by node:zlib, independent of the server's encoder [confirmed].
  it('when a browser accepts brotli, then a script answers with Content-Encoding: br, Vary: Accept-Encoding, and decodes to the file', async () => {
    const res = await rawGet(clientApp, '/assets/index-Ab12Cd34.js', { 'accept-encoding': 'br, gzip' });
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('br');
    expect(res.headers.vary).toMatch(/accept-encoding/i);
    expect(zlib.brotliDecompressSync(res.body).toString()).toBe(bundle);
    expect(res.body.length).toBeLessThan(Buffer.byteLength(bundle) / 3);
  });

  it('when a browser accepts only gzip, then the script answers gzip-encoded and decodes to the file', async () => {
    const res = await rawGet(clientApp, '/assets/index-Ab12Cd34.js', { 'accept-encoding': 'gzip' });
    expect(res.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(res.body).toString()).toBe(bundle);
  });

  it('when a client asks for no encoding, then the file comes as it is', async () => {
    const res = await rawGet(clientApp, '/assets/index-Ab12Cd34.js', {});
    expect(res.headers['content-encoding']).toBeUndefined();
    expect(res.body.toString()).toBe(bundle);
  });

  // Cache-Control: RFC 9111 §5.2.2 (max-age, no-cache) and RFC 8246 (immutable) [confirmed]; a year for
  // content-hashed file names is common practice [common practice].
  it('when a content-hashed asset is served, then it may be cached for a year as immutable', async () => {
    const res = await request(clientApp).get('/assets/index-Ab12Cd34.js');
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('when the page itself is served, at / or at a client route, then it must be revalidated every time', async () => {
    for (const url of ['/', '/cases/12', '/index.html']) {
      const res = await request(clientApp).get(url);
      expect(res.status, url).toBe(200);
      expect(res.headers['cache-control'], url).toBe('no-cache');
      expect(res.text, url).toContain('index-Ab12Cd34.js');
    }
  });

  it('when a file without a hash in its name is served, then it is cached for a limited time only', async () => {
    const res = await request(clientApp).get('/cristae.svg');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('public, max-age=3600');
  });

  it('when the API answers next to the client, then it is neither served from the client folder nor marked immutable', async () => {
    const res = await rawGet(clientApp, '/api/health', { 'accept-encoding': 'br, gzip' });
    expect(res.status).toBe(200);
    expect(JSON.parse(res.body.toString())).toEqual({ status: 'ok' });
    expect(res.headers['cache-control'] ?? '').not.toMatch(/immutable/);
    const missing = await request(clientApp).get('/api/no-such-route');
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBeDefined();
  });
});

/** The session id in a Set-Cookie value (`cristae.sid=s%3A<id>.<signature>; …`). */
function sessionCookie(setCookie: string[] | string | undefined): { sid: string; expires: number } | null {
  const line = [setCookie ?? []].flat().find((c) => c.startsWith('cristae.sid='));
  if (!line) return null;
  const value = decodeURIComponent(line.split(';')[0]!.slice('cristae.sid='.length));
  const expires = /Expires=([^;]+)/i.exec(line)?.[1];
  return { sid: value.slice(2, value.lastIndexOf('.')), expires: expires ? Date.parse(expires) : NaN };
}

async function storedExpiry(sid: string): Promise<number> {
  const [rows] = await sequelize.query('SELECT expires FROM "Sessions" WHERE sid = :sid', { replacements: { sid } });
  const row = (rows as { expires: string | Date }[])[0];
  if (!row) throw new Error(`no stored session ${sid}`);
  return new Date(row.expires).getTime();
}

describe('sessions: rolling expiry in coarse steps', () => {
  // OWASP ASVS 4.0 3.3.2 (idle timeout) [confirmed]; stepping the extension rather than writing it on every
  // request is common practice for cookie sessions [common practice]. Cookie Expires: RFC 6265 §5.2.1 [confirmed].
  it('when a signed-in browser asks again within the step, then no cookie is sent and nothing is written; after the step the expiry moves forward once', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    const start = Date.now();
    const agent = request.agent(app);
    agent.set('Origin', ORIGIN);
    const login = await agent.post('/api/auth/login').send({ email: 'technologist@demo.test', password: PASSWORD });
    expect(login.status).toBe(200);
    const opened = sessionCookie(login.headers['set-cookie']);
    expect(opened).not.toBeNull();
    const firstExpiry = await storedExpiry(opened!.sid);
    expect(Math.abs(opened!.expires - firstExpiry)).toBeLessThan(1500); // HTTP dates have whole seconds

    vi.setSystemTime(start + 60_000);
    for (const url of ['/api/auth/me', '/api/cases', '/api/auth/me']) {
      const res = await agent.get(url);
      expect(res.status, url).toBe(200);
      expect(sessionCookie(res.headers['set-cookie']), url).toBeNull();
    }
    expect(await storedExpiry(opened!.sid)).toBe(firstExpiry);

    vi.setSystemTime(start + 6 * 60_000);
    const later = await agent.get('/api/auth/me');
    expect(later.status).toBe(200);
    const extended = sessionCookie(later.headers['set-cookie']);
    expect(extended?.sid).toBe(opened!.sid);
    expect(extended!.expires).toBeGreaterThanOrEqual(opened!.expires + 5 * 60_000);
    expect(await storedExpiry(opened!.sid)).toBeGreaterThanOrEqual(firstExpiry + 6 * 60_000);

    const again = await agent.get('/api/auth/me');
    expect(again.status).toBe(200);
    expect(sessionCookie(again.headers['set-cookie'])).toBeNull();

    // Idle for longer than the eight hours since the last extension: the session is over.
    vi.setSystemTime(start + 6 * 60_000 + 8 * 60 * 60_000 + 1000);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });

  it('when nobody is signed in, then API answers set no session cookie', async () => {
    const res = await request(app).get('/api/health');
    expect(res.status).toBe(200);
    expect(sessionCookie(res.headers['set-cookie'])).toBeNull();
  });
});

async function count(table: string, where = '1 = 1', replacements: Record<string, unknown> = {}): Promise<number> {
  const [rows] = await sequelize.query(`SELECT COUNT(*) AS n FROM "${table}" WHERE ${where}`, { replacements });
  return Number((rows as { n: number | string }[])[0]!.n);
}

describe('writes in parallel', () => {
  it('when 40 patients and 20 cases are registered at once beside 20 case-list reads, then every acknowledged write is stored once, with its audit event', async () => {
    const agent = request.agent(app);
    agent.set('Origin', ORIGIN);
    expect((await agent.post('/api/auth/login').send({ email: 'technologist@demo.test', password: PASSWORD })).status).toBe(200);
    const [clinician] = await clinicianIds(agent);
    const patientsBefore = await count('patients');
    const casesBefore = await count('cases');

    // Patients for the case registrations, made first (one each).
    const owners = await Promise.all(Array.from({ length: 20 }, () => agent.post('/api/patients').send(buildPatientInput())));
    expect(owners.map((r) => r.status)).toEqual(Array(20).fill(201));

    const patientWrites = Array.from({ length: 40 }, () => agent.post('/api/patients').send(buildPatientInput()));
    const caseWrites = owners.map((o) => agent.post('/api/cases').send(buildRegisterCaseInput(o.body.id, clinician!)));
    const reads = Array.from({ length: 20 }, () => agent.get('/api/cases'));
    const [patients, cases, listed] = await Promise.all([Promise.all(patientWrites), Promise.all(caseWrites), Promise.all(reads)]);

    expect(patients.map((r) => r.status)).toEqual(Array(40).fill(201));
    expect(cases.map((r) => r.status)).toEqual(Array(20).fill(201));
    expect(listed.map((r) => r.status)).toEqual(Array(20).fill(200));

    const patientIds = [...owners, ...patients].map((r) => r.body.id as number);
    const caseIds = cases.map((r) => r.body.id as number);
    expect(new Set(patientIds).size).toBe(60);
    expect(new Set(cases.map((r) => r.body.accession as string)).size).toBe(20);
    expect(await count('patients', 'id IN (:ids)', { ids: patientIds })).toBe(60);
    expect(await count('cases', 'id IN (:ids)', { ids: caseIds })).toBe(20);
    expect(await count('patients')).toBe(patientsBefore + 60);
    expect(await count('cases')).toBe(casesBefore + 20);
    const audited = await count('audit_events', `entity = 'patient' AND action = 'create' AND "entityId" IN (:ids)`, {
      ids: patientIds.map(String),
    });
    expect(audited).toBe(60);
  });
});
