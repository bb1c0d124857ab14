import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreateMeasurementInput } from '@/schemas/measurement';
import { createCase } from '../factories/cases';
import { cuvette, recordDirectProtein } from '../factories/measurements';
import { makeAppWithLabStaff, type Agent } from '../setup/lab-staff';
import { countRows, type TestApp } from '../setup/test-app';

/*
 * The calculation contract at the HTTP edge (issue: numbers a director can trust): a trace the engine cannot
 * trust answers 200 with activity null or a flag; impossible inputs answer 400 naming the field and store
 * nothing; no non-finite number is ever stored.
 */

let t: TestApp;
let tech: Agent;
beforeAll(async () => {
  ({ t, tech } = await makeAppWithLabStaff());
});
afterAll(() => t.close());

/** A = 0.6 + 0.7·e^(−k·t/min) every 10 s for 300 s; initial rate −0.7·k A/min [analytic]. */
const decay = (k: number) => Array.from({ length: 31 }, (_, i) => ({ t: i * 10, a: 0.6 + 0.7 * Math.exp((-k * i * 10) / 60) }));
const preview = { assay: 'CIV', pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 20, proteinMgPerMl: 2 };

describe('POST /api/calculations/activity on traces it cannot trust', () => {
  it('when a first-order decay (k 0.5/min) is sent, then 200 with activity null and NO_LINEAR_WINDOW — not 343.5 for 473.0', async () => {
    const res = await tech.post('/api/calculations/activity').send({ ...preview, total: decay(0.5) });
    expect(res.status).toBe(200);
    expect(res.body.activity).toBeNull();
    expect(res.body.flags.map((f: { code: string }) => f.code)).toContain('NO_LINEAR_WINDOW');
  });

  it('when the same curve is read through a window set by hand, then 200 with the activity and CURVATURE with its numbers', async () => {
    const res = await tech.post('/api/calculations/activity').send({ ...preview, total: decay(0.5), window: { fromS: 0, toS: 80 } });
    expect(res.status).toBe(200);
    expect(res.body.activity).toBeGreaterThan(0);
    const curvature = res.body.flags.find((f: { code: string }) => f.code === 'CURVATURE');
    expect(curvature.values.changePct).toBeLessThan(-5);
  });

  it.each([
    ['pathlengthCm', 1e-300],
    ['sampleVolumeUl', 0.02],
    ['proteinMgPerMl', 1e308],
  ])('when %s is %s, then 400 names it', async (field, value) => {
    const res = await tech.post('/api/calculations/activity').send({ ...preview, total: decay(0.05), [field]: value });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toContain(field);
  });

  it('when an absorbance reading is impossible (1e308), then 400 names the reading', async () => {
    const total = decay(0.05);
    total[4] = { t: 40, a: 1e308 };
    const res = await tech.post('/api/calculations/activity').send({ ...preview, total });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).join(' ')).toMatch(/total.*4.*a/);
  });
});

describe('saving measurements with impossible inputs', () => {
  async function caseWithProtein() {
    const c = await createCase(tech);
    const specimen = c.specimens[0]!;
    expect((await recordDirectProtein(tech, specimen, 4, 'BCA, read elsewhere (test)')).status).toBe(200);
    return { caseId: c.id, specimenId: specimen.id };
  }
  const rates = (specimenId: number, extra: Partial<CreateMeasurementInput>) =>
    ({ mode: 'rates', specimenId, assay: 'CI', replicate: 1, ...cuvette, totalRatePerMin: -0.03, backgroundRatePerMin: -0.005, ...extra }) as CreateMeasurementInput;

  it.each([
    ['totalRatePerMin', 1e308],
    ['totalRatePerMin', 96],
    ['backgroundRatePerMin', -1e308],
    ['pathlengthCm', 1e-300],
    ['sampleVolumeUl', 0.02],
  ] as const)('when %s is %s, then 400 names it and nothing is stored', async (field, value) => {
    const { caseId, specimenId } = await caseWithProtein();
    const before = await countRows(t.sequelize, 'measurements');
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId, { [field]: value }));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toContain(field);
    expect(await countRows(t.sequelize, 'measurements')).toBe(before);
  });

  it('when a rate is 100 times too high but physically possible, then it is saved with no activity and IMPLAUSIBLE_ACTIVITY, and the results carry no number from it', async () => {
    const { caseId, specimenId } = await caseWithProtein();
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send(rates(specimenId, { totalRatePerMin: -3, backgroundRatePerMin: -0.5 }));
    expect(res.status).toBe(201);
    expect(res.body.activity).toBeNull();
    expect(res.body.flags.map((f: { code: string }) => f.code)).toContain('IMPLAUSIBLE_ACTIVITY');
    const results = await tech.get(`/api/cases/${caseId}/results`);
    expect(results.status).toBe(200);
    expect(JSON.stringify(results.body)).not.toMatch(/Infinity|NaN|e\+30/);
  });

  it('when every stored number is read back, then none is non-finite (the database holds no Infinity or NaN)', async () => {
    const [rows] = await t.sequelize.query(
      "SELECT COUNT(*) AS n FROM measurements WHERE activity IS NOT NULL AND (activity > 1e300 OR activity < -1e300 OR activity != activity OR activity = 'NaN')",
    );
    expect((rows as { n: number }[])[0]!.n).toBe(0);
  });
});
