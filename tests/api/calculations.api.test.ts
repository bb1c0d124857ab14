import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { linearRegression } from 'simple-statistics';
import { ORIGIN, countRows, makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
let tech: Awaited<ReturnType<TestApp['signedIn']>>;
let director: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
  director = await t.signedIn('director');
});
afterAll(() => t.close());

/** A straight trace: a = a0 + (slopePerMin / 60) · t, read every 10 s. */
const trace = (a0: number, slopePerMin: number, n = 13) =>
  Array.from({ length: n }, (_, i) => ({ t: i * 10, a: a0 + (slopePerMin / 60) * i * 10 }));

// Worked example [derived] (docs/domain.md §1, consensus factors after Medja et al. 2009 [from memory]):
// CI, ΔA/min specific 0.0248, 1 mL reaction, 1 cm, 40 µg protein in the cuvette -> 0.0248 × 4032.3 = 100.0
// nmol/min/mg. Here 40 µg = 10 µL of a 4 mg/mL homogenate in 1000 µL.
const ciWorked = {
  assay: 'CI',
  pathlengthCm: 1,
  reactionVolumeUl: 1000,
  sampleVolumeUl: 10,
  proteinMgPerMl: 4,
  total: trace(1.2, -0.0348),
  background: trace(1.1, -0.01),
};

describe('POST /api/calculations/activity', () => {
  it('when the CI worked example is sent, then the activity is 100.0 nmol/min/mg and the contract fields are all there', async () => {
    const before = await countRows(t.sequelize, 'measurements');
    const res = await tech.post('/api/calculations/activity').send(ciWorked);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ assay: 'CI', definitionVersion: 1, unit: 'nmol/min/mg protein', flags: [] });
    expect(res.body.slopeTotalPerMin).toBeCloseTo(-0.0348, 6);
    expect(res.body.slopeBackgroundPerMin).toBeCloseTo(-0.01, 6);
    expect(res.body.specificSlopePerMin).toBeCloseTo(-0.0248, 6);
    expect(res.body.activity).toBeCloseTo(100.0, 1);
    expect(res.body.r2).toBeCloseTo(1, 9);
    expect(res.body.window).toEqual({ fromS: expect.any(Number), toS: expect.any(Number) });
    expect(await countRows(t.sequelize, 'measurements')).toBe(before); // a preview stores nothing
  });

  it('when a window is given, then the slopes are the least-squares slopes of that window (simple-statistics)', async () => {
    // A trace that bends after 60 s: only the early part is linear.
    const total = Array.from({ length: 13 }, (_, i) => ({ t: i * 10, a: 0.2 + 0.0005 * i * 10 + (i > 6 ? 0.0004 * (i - 6) ** 2 : 0) }));
    const res = await director.post('/api/calculations/activity').send({ ...ciWorked, assay: 'CS', total, background: undefined, window: { fromS: 0, toS: 60 } });
    expect(res.status).toBe(200);
    const inWindow = total.filter((p) => p.t <= 60).map((p) => [p.t, p.a] as [number, number]);
    expect(res.body.slopeTotalPerMin).toBeCloseTo(linearRegression(inWindow).m * 60, 9);
    expect(res.body.slopeBackgroundPerMin).toBeNull();
    expect(res.body.specificSlopePerMin).toBe(res.body.slopeTotalPerMin);
    expect(res.body.window).toEqual({ fromS: 0, toS: 60 });
  });

  it('when the specific slope runs the wrong way for the assay, then a WRONG_SIGN flag and no negative activity', async () => {
    // CIII reduces cytochrome c: absorbance at 550 nm rises [confirmed] consensus table. A falling trace is wrong.
    const res = await tech.post('/api/calculations/activity').send({ ...ciWorked, assay: 'CIII', total: trace(1, -0.05), background: trace(1, 0) });
    expect(res.status).toBe(200);
    expect(res.body.activity).toBeNull();
    expect(res.body.flags.map((f: { code: string }) => f.code)).toContain('WRONG_SIGN');
  });

  it.each([
    [{ proteinMgPerMl: 0 }, 'proteinMgPerMl'],
    [{ reactionVolumeUl: -1 }, 'reactionVolumeUl'],
    [{ sampleVolumeUl: 0 }, 'sampleVolumeUl'],
    [{ assay: 'CV' }, 'assay'],
    [{ total: [{ t: 0, a: 1 }, { t: 1, a: 1 }] }, 'total'],
    [{ pathlengthCm: undefined }, 'pathlengthCm'],
    [{ extra: 1 }, 'extra'],
  ])('when the request has %o, then 400 naming %s', async (change, field) => {
    const res = await tech.post('/api/calculations/activity').send({ ...ciWorked, ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('when a clinician or an admin asks, then 403; with no session, 401', async () => {
    expect((await (await t.signedIn('clinician')).post('/api/calculations/activity').send(ciWorked)).status).toBe(403);
    expect((await (await t.signedIn('admin')).post('/api/calculations/activity').send(ciWorked)).status).toBe(403);
    expect((await request(t.app).post('/api/calculations/activity').set('Origin', ORIGIN).send(ciWorked)).status).toBe(401);
  });
});

describe('assay definitions are versioned', () => {
  it('when a director saves a new ε for CI and a second director approves it, then previews use version 2 and version 1 stays readable', async () => {
    const current = (await director.get('/api/assay-definitions')).body.items.find((d: { definition: { code: string } }) => d.definition.code === 'CI');
    const { code: _c, version: _v, ...fields } = current.definition;
    const saved = await director
      .post('/api/assay-definitions/CI/versions')
      .send({ definition: { ...fields, epsilonPerMmPerCm: 6.22, epsilonSource: 'Laboratory check, invented for this test' }, changeNote: 'Test change of ε', basedOnVersion: 1 });
    expect(saved.status).toBe(201);
    expect(saved.body.definition.version).toBe(2);
    expect(saved.body.status).toBe('draft');
    // Separation of duties: the draft is in force only once another director approves it.
    const approved = await (await t.signedIn('director2')).post('/api/assay-definitions/CI/versions/2/approve').send({});
    expect(approved.status).toBe(200);
    const preview = await tech.post('/api/calculations/activity').send(ciWorked);
    expect(preview.body.definitionVersion).toBe(2);
    // activity ∝ 1/ε (Beer–Lambert): 100.0 × 6.2 / 6.22
    expect(preview.body.activity).toBeCloseTo((100.0 * 6.2) / 6.22, 1);
    const versions = await tech.get('/api/assay-definitions/CI/versions');
    expect(versions.body.items.map((v: { definition: { version: number } }) => v.definition.version)).toEqual([2, 1]);
    expect(versions.body.items[1].definition.epsilonPerMmPerCm).toBe(6.2);
  });

  it('when a director saves from a stale version, then 409 and no new version', async () => {
    const current = (await director.get('/api/assay-definitions/CS/versions')).body.items[0];
    const { code: _c, version: _v, ...fields } = current.definition;
    const body = { definition: fields, changeNote: 'First change', basedOnVersion: 1 };
    expect((await director.post('/api/assay-definitions/CS/versions').send(body)).status).toBe(201);
    const stale = await director.post('/api/assay-definitions/CS/versions').send({ ...body, changeNote: 'Second change' });
    expect(stale.status).toBe(409);
    expect((await director.get('/api/assay-definitions/CS/versions')).body.items).toHaveLength(2);
  });

  it('when a technologist tries to change a definition, then 403', async () => {
    const res = await tech.post('/api/assay-definitions/CI/versions').send({});
    expect(res.status).toBe(403);
  });
});

describe('a definition version that breaks a cross-field rule', () => {
  it('when the linear range is upside down, then 400 naming definition.linearRangeMax and no new version', async () => {
    const current = (await director.get('/api/assay-definitions/CII/versions')).body.items[0];
    const { code: _c, version: _v, ...fields } = current.definition;
    const res = await director
      .post('/api/assay-definitions/CII/versions')
      .send({ definition: { ...fields, linearRangeMin: 2, linearRangeMax: 1 }, changeNote: 'Broken range', basedOnVersion: current.definition.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty(['definition.linearRangeMax']);
    expect((await director.get('/api/assay-definitions/CII/versions')).body.items).toHaveLength(1);
  });
});
