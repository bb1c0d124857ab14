import { mean as ssMean, sampleStandardDeviation } from 'simple-statistics';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  controlChartSchema,
  controlMaterialDetailSchema,
  controlMaterialSchema,
  controlTargetSchema,
  type ControlMaterialDetail,
} from '@/schemas/qc';
import { AnalyticalRunModel } from '../../server/modules/runs/run.model';
import { ControlResultModel } from '../../server/modules/qc/qc.model';
import { evaluateRunControls } from '../../server/modules/qc/run-evaluation';
import { countRows, makeTestApp, type TestApp } from '../setup/test-app';
import { signInAll } from '../setup/signed-in-agents';

/*
 * Control materials, their versioned targets (entered, or established from the first 20 results), approval, the
 * Levey–Jennings chart data, and the run evaluation other modules call. Materials and lots are invented.
 */
type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let director2: Agent;

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, director2] = await signInAll(t, ['technologist', 'director', 'director2'] as const);
});
afterAll(() => t.close());

let lotCounter = 0;
async function createMaterial(level = 'Level 1'): Promise<ControlMaterialDetail> {
  lotCounter += 1;
  const res = await director.post('/api/control-materials').send({
    name: 'Bovine heart homogenate pool (fictitious)',
    lot: `BH-${lotCounter}`,
    level,
    expiresOn: '2027-06-30',
    description: 'Pooled in-house control',
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return controlMaterialDetailSchema.parse(res.body);
}

async function approvedTarget(materialId: number, assayCode: string, mean: number, sd: number): Promise<number> {
  const draft = await director.post(`/api/control-materials/${materialId}/targets`).send({ assayCode, mean, sd, note: '' });
  expect(draft.status, JSON.stringify(draft.body)).toBe(201);
  const approved = await director2.post(`/api/control-targets/${draft.body.id}/approve`);
  expect(approved.status, JSON.stringify(approved.body)).toBe(200);
  return draft.body.id as number;
}

let runCounter = 0;
/** A stored run with control results (as the runs module would store them), started at the given time. */
async function storeRun(
  startedAt: Date,
  results: { controlMaterialId: number; assayCode: string; value: number; z?: number | null; controlTargetId?: number | null }[],
  qcStatus: 'accept' | 'warn' | 'reject' | 'none' = 'accept',
): Promise<number> {
  runCounter += 1;
  const run = await AnalyticalRunModel.create({
    runNumber: `RUN-TEST-${String(runCounter).padStart(4, '0')}`,
    instrument: 'Plate reader (test)',
    startedAt,
    operatorId: null,
    plateFormat: 96,
    layout: '[]',
    definitionVersions: '{}',
    uploadId: null,
    qcStatus,
  });
  for (const r of results) {
    await ControlResultModel.create({
      runId: run.id,
      controlMaterialId: r.controlMaterialId,
      assayCode: r.assayCode,
      value: r.value,
      controlTargetId: r.controlTargetId ?? null,
      z: r.z ?? null,
      measuredAt: startedAt,
    });
  }
  return run.id;
}

const day = (n: number) => new Date(Date.UTC(2026, 0, 1) + n * 86_400_000);

describe('control materials', () => {
  it('a director creates, lists, edits with the version seen, and retires; each step audited', async () => {
    const audits = await countRows(t.sequelize, 'audit_events');
    const m = await createMaterial();
    expect(m).toMatchObject({ level: 'Level 1', expiresOn: '2027-06-30', retiredAt: null, version: 0, targets: [] });

    const list = await tech.get('/api/control-materials').expect(200);
    expect(list.body.items.map((i: unknown) => controlMaterialSchema.parse(i).id)).toContain(m.id);

    const edited = await director.patch(`/api/control-materials/${m.id}`).send({ version: 0, description: 'Aliquots at −80 °C' });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ description: 'Aliquots at −80 °C', version: 1 });
    const stale = await director.patch(`/api/control-materials/${m.id}`).send({ version: 0, lot: 'X' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');

    const retired = await director.patch(`/api/control-materials/${m.id}`).send({ version: 1, retired: true });
    expect(retired.body.retiredAt).not.toBeNull();
    expect(await countRows(t.sequelize, 'audit_events')).toBe(audits + 3);
    // A retired material takes no new targets.
    const refused = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CI', mean: 10, sd: 1 });
    expect(refused.status).toBe(409);
  });

  it('technologists read but do not write; bad input names the field and writes nothing', async () => {
    expect((await tech.post('/api/control-materials').send({ name: 'x', lot: 'y', level: 'z', expiresOn: '2027-01-01' })).status).toBe(403);
    const rows = await countRows(t.sequelize, 'control_materials');
    const bad = await director.post('/api/control-materials').send({ name: '', lot: 'L', level: '1', expiresOn: '2027-02-30' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['expiresOn', 'name']);
    const m = await createMaterial();
    const badTarget = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CI', mean: 10, sd: 0 });
    expect(badTarget.status).toBe(400);
    expect(Object.keys(badTarget.body.error.fields)).toEqual(['sd']);
    expect(await countRows(t.sequelize, 'control_materials')).toBe(rows + 1);
  });

  it('two directors creating the same material, lot and level at once: one succeeds, the other gets 409', async () => {
    const body = { name: 'Twin pool (fictitious)', lot: 'TW-1', level: 'Level 2', expiresOn: '2027-01-31' };
    const answers = await Promise.all([director.post('/api/control-materials').send(body), director2.post('/api/control-materials').send(body)]);
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409]);
  });
});

describe('targets', () => {
  it('an entered target is a draft, approved by another director; approving the next version retires the previous', async () => {
    const m = await createMaterial();
    const v1 = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CIV', mean: 80, sd: 6, note: 'From the lot sheet' });
    expect(controlTargetSchema.parse(v1.body)).toMatchObject({ version: 1, status: 'draft', source: 'entered' });
    // Separation of duties, as for intervals: the drafter may not approve their own (the demo has two directors).
    expect((await director.post(`/api/control-targets/${v1.body.id}/approve`)).status).toBe(403);
    expect((await tech.post(`/api/control-targets/${v1.body.id}/approve`)).status).toBe(403);
    expect((await director2.post(`/api/control-targets/${v1.body.id}/approve`)).body.status).toBe('approved');

    const v2 = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CIV', mean: 82, sd: 5 });
    expect(v2.body.version).toBe(2);
    await director2.post(`/api/control-targets/${v2.body.id}/approve`).expect(200);
    const detail = controlMaterialDetailSchema.parse((await tech.get(`/api/control-materials/${m.id}`)).body);
    expect(detail.targets.map((x) => [x.version, x.status])).toEqual([
      [2, 'approved'],
      [1, 'retired'],
    ]);
    expect(detail.approvedAssays).toEqual(['CIV']);
    expect((await director2.post(`/api/control-targets/${v2.body.id}/approve`)).status).toBe(409);
  });

  it('two drafts approved at the same time leave exactly one approved version', async () => {
    const m = await createMaterial();
    const a = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CS', mean: 150, sd: 10 });
    const b = await director.post(`/api/control-materials/${m.id}/targets`).send({ assayCode: 'CS', mean: 155, sd: 11 });
    const answers = await Promise.all([
      director2.post(`/api/control-targets/${a.body.id}/approve`),
      director2.post(`/api/control-targets/${b.body.id}/approve`),
    ]);
    expect(answers.map((x) => x.status)).toEqual([200, 200]);
    const detail = controlMaterialDetailSchema.parse((await tech.get(`/api/control-materials/${m.id}`)).body);
    expect(detail.targets.filter((x) => x.status === 'approved')).toHaveLength(1);
  });

  it('establishing needs 20 results (the answer says how many exist), then uses the first 20 in run order', async () => {
    const m = await createMaterial();
    // Values invented; stored in an order different from run order, so "first 20" must follow run start.
    const values = [41.2, 39.8, 40.5, 42.1, 38.9, 40.0, 41.7, 39.3, 40.8, 40.2, 41.0, 39.6, 40.4, 42.4, 38.7, 40.9, 39.9, 41.3, 40.1, 39.5, 55.0, 25.0];
    for (let i = 0; i < 19; i += 1) await storeRun(day(40 - i), [{ controlMaterialId: m.id, assayCode: 'CI', value: values[18 - i]! }]);
    const targetsBefore = await countRows(t.sequelize, 'control_targets');
    const tooFew = await director.post(`/api/control-materials/${m.id}/targets/establish`).send({ assayCode: 'CI' });
    expect(tooFew.status).toBe(400);
    expect(tooFew.body.error.fields.assayCode).toMatch(/^19 control results .* 20 are needed/);
    expect(await countRows(t.sequelize, 'control_targets')).toBe(targetsBefore);

    await storeRun(day(41), [{ controlMaterialId: m.id, assayCode: 'CI', value: values[19]! }]);
    // Later results (outliers) must not enter the first 20.
    await storeRun(day(42), [{ controlMaterialId: m.id, assayCode: 'CI', value: values[20]! }]);
    await storeRun(day(43), [{ controlMaterialId: m.id, assayCode: 'CI', value: values[21]! }]);
    const res = await director.post(`/api/control-materials/${m.id}/targets/establish`).send({ assayCode: 'CI' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const target = controlTargetSchema.parse(res.body);
    const first20 = values.slice(0, 20);
    // [confirmed] simple-statistics' mean and sampleStandardDeviation (n − 1 denominator) as the reference.
    expect(target.mean).toBeCloseTo(ssMean(first20), 10);
    expect(target.sd).toBeCloseTo(sampleStandardDeviation(first20), 10);
    expect(target).toMatchObject({ source: 'established', status: 'draft' });
    expect(target.basis!.n).toBe(20);
    expect(target.basis!.resultIds).toHaveLength(20);
    const stored = await ControlResultModel.findAll({ where: { id: target.basis!.resultIds } });
    expect(stored.map((r) => r.value).sort()).toEqual([...first20].sort());
  });
});

describe('evaluateRunControls and the chart', () => {
  it('judges a run against approved targets with the earlier runs as history, and answers none without targets', async () => {
    const low = await createMaterial('Low');
    const high = await createMaterial('High');
    const lowTarget = await approvedTarget(low.id, 'CII', 50, 5);
    const highTarget = await approvedTarget(high.id, 'CII', 200, 20);

    // History: the low level at +2.4 SD on day 1 (warning), stored as its run judged it.
    await storeRun(day(100), [
      { controlMaterialId: low.id, assayCode: 'CII', value: 62, z: 2.4, controlTargetId: lowTarget },
      { controlMaterialId: high.id, assayCode: 'CII', value: 200, z: 0, controlTargetId: highTarget },
    ], 'warn');

    // This run: low 61 → z 2.2, the second in a row beyond +2 SD: 2-2s across runs [from memory] the paper.
    const verdict = await evaluateRunControls({
      runId: null,
      startedAt: day(101),
      results: [
        { controlMaterialId: low.id, assayCode: 'CII', value: 61 },
        { controlMaterialId: high.id, assayCode: 'CII', value: 210 },
      ],
    });
    expect(verdict.status).toBe('reject');
    expect(verdict.violations).toEqual([
      { rule: '1-2s', assayCode: 'CII', controlMaterialIds: [low.id] },
      { rule: '2-2s', assayCode: 'CII', controlMaterialIds: [low.id] },
    ]);
    expect(verdict.perResult[0]).toMatchObject({ controlTargetId: lowTarget });
    expect(verdict.perResult[0]!.z).toBeCloseTo(2.2, 12);
    expect(verdict.perResult[1]!.z).toBeCloseTo(0.5, 12);

    // A run that started before the history run does not see it.
    const earlier = await evaluateRunControls({ runId: null, startedAt: day(99), results: [{ controlMaterialId: low.id, assayCode: 'CII', value: 61 }] });
    expect(earlier.status).toBe('warn');

    // No approved target for this assay → none.
    const none = await evaluateRunControls({ runId: null, startedAt: day(101), results: [{ controlMaterialId: low.id, assayCode: 'CIII', value: 3 }] });
    expect(none).toEqual({ status: 'none', violations: [], perResult: [{ controlMaterialId: low.id, assayCode: 'CIII', controlTargetId: null, z: null }] });
  });

  it('follows the laboratory rules: with 2-2s switched off the same run only warns', async () => {
    const m = await createMaterial();
    const target = await approvedTarget(m.id, 'CI+III', 30, 3);
    await storeRun(day(200), [{ controlMaterialId: m.id, assayCode: 'CI+III', value: 37, z: 7 / 3, controlTargetId: target }]);
    const input = { runId: null, startedAt: day(201), results: [{ controlMaterialId: m.id, assayCode: 'CI+III', value: 37 }] };
    expect((await evaluateRunControls(input)).status).toBe('reject');
    await director.put('/api/qc/rules').send({ rules: ['1-2s', '1-3s', 'R-4s'] }).expect(200);
    try {
      expect((await evaluateRunControls(input)).status).toBe('warn');
    } finally {
      await director.put('/api/qc/rules').send({ rules: ['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10x'] }).expect(200);
    }
  });

  it('GET …/chart gives the approved targets and every result in run order with run status', async () => {
    const m = await createMaterial();
    const target = await approvedTarget(m.id, 'CIII', 100, 10);
    const r2 = await storeRun(day(302), [{ controlMaterialId: m.id, assayCode: 'CIII', value: 135, z: 3.5, controlTargetId: target }], 'reject');
    const r1 = await storeRun(day(301), [{ controlMaterialId: m.id, assayCode: 'CIII', value: 104, z: 0.4, controlTargetId: target }]);
    const res = await tech.get(`/api/control-materials/${m.id}/chart`).query({ assay: 'CIII' });
    expect(res.status).toBe(200);
    const chart = controlChartSchema.parse(res.body);
    expect(chart.targets.map((x) => [x.mean, x.sd, x.status])).toEqual([[100, 10, 'approved']]);
    expect(chart.points.map((p) => [p.runId, p.value, p.runStatus, p.overridden])).toEqual([
      [r1, 104, 'accept', false],
      [r2, 135, 'reject', false],
    ]);
    const bad = await tech.get(`/api/control-materials/${m.id}/chart`).query({ assay: 'CX' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['assay']);
    expect((await tech.get('/api/control-materials/999999/chart').query({ assay: 'CI' })).status).toBe(404);
  });
});
