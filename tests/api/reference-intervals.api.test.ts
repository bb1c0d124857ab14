import { mean as ssMean, sampleStandardDeviation } from 'simple-statistics';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_INTERVAL_SET_LABEL, demoReferenceIntervals } from '@/schemas/assay';
import { deriveResultSchema, partitionCheckResultSchema, verificationResultSchema } from '@/schemas/reference-interval';
import {
  controlPreviewSchema,
  controlUploadListSchema,
  controlUploadResponseSchema,
  intervalListSchema,
  storedIntervalSchema,
  type StoredInterval,
} from '@/schemas/reference-interval-api';
import {
  findApplicableInterval,
  getIntervalById,
  toComparisonInterval,
} from '../../server/modules/reference-intervals/reference-intervals.service';
import { compareValue } from '../../server/domain/assay-engine/compare';
import { buildIntervalDraft } from '../factories/intervals';
import { countRows, makeTestApp, type TestApp } from '../setup/test-app';

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let director: Agent;
/** The demo's second director: approves what the first one drafts (separation of duties). */
let director2: Agent;
let technologist: Agent;

beforeAll(async () => {
  t = await makeTestApp();
  director = await t.signedIn('director');
  director2 = await t.signedIn('director2');
  technologist = await t.signedIn('technologist');
});
afterAll(() => t.close());

const range = (from: number, to: number) => Array.from({ length: to - from + 1 }, (_, i) => from + i);

/** A manual draft body; each test picks its own key so tests do not share versions. */
const draftBody = buildIntervalDraft;

async function createDraft(overrides: Record<string, unknown> = {}): Promise<StoredInterval> {
  const res = await director.post('/api/reference-intervals').send(draftBody(overrides));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return storedIntervalSchema.parse(res.body);
}

async function approve(i: StoredInterval): Promise<StoredInterval> {
  const res = await director2.post(`/api/reference-intervals/${i.id}/approve`).send({ revision: i.revision });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return storedIntervalSchema.parse(res.body);
}

describe('POST /api/reference-intervals/derive (contract)', () => {
  it('when 1..120 are derived nonparametrically, then the limits sit at ranks 3.025 and 117.975 with CIs at ranks 1–7 and 114–120', async () => {
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'nonparametric', outliers: 'none', values: range(1, 120) });
    expect(res.status).toBe(200);
    const body = deriveResultSchema.parse(res.body);
    // CLSI EP28-A3c: ranks 0.025(n+1) = 3.025 and 0.975(n+1) = 117.975, interpolated; with values 1..n the
    // value at rank r is r [derived from CLSI EP28-A3c, confirmed].
    expect(body.n).toBe(120);
    expect(body.lower).toBeCloseTo(3.025, 10);
    expect(body.upper).toBeCloseTo(117.975, 10);
    // 90% CI ranks for n = 120: 1–7 and 114–120 (EP28 table as recalled in domain.md §3) [from memory].
    expect(body.lowerCi).toEqual([1, 7]);
    expect(body.upperCi).toEqual([114, 120]);
    expect(body.excluded).toEqual([]);
    expect(Object.keys(res.body)).toEqual(expect.arrayContaining(['n', 'lower', 'upper', 'lowerCi', 'upperCi', 'excluded', 'warnings']));
  });

  it('when mean ± 2 SD is asked for, then the limits equal mean ± 2·sample SD from simple-statistics and no CI is given', async () => {
    const values = [12.1, 14.8, 9.6, 11.2, 13.3, 10.9, 15.4, 12.7, 11.8, 13.9, 10.2, 12.5];
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'none', values });
    expect(res.status).toBe(200);
    // Reference: simple-statistics mean and sampleStandardDeviation (n − 1) [common practice].
    const m = ssMean(values);
    const sd = sampleStandardDeviation(values);
    expect(res.body.lower).toBeCloseTo(m - 2 * sd, 10);
    expect(res.body.upper).toBeCloseTo(m + 2 * sd, 10);
    expect(res.body.lowerCi).toBeNull();
    expect(res.body.upperCi).toBeNull();
  });

  it('when the robust method gets fewer than 120 values, then it answers with a visible warning', async () => {
    const values = range(1, 40).map((v) => 50 + (v % 9) * 1.5 + v / 10);
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'robust', outliers: 'none', values });
    expect(res.status).toBe(200);
    expect(res.body.n).toBe(40);
    // Horn, Pesce & Copeland 1998 is for n below EP28's 120 [confirmed]; the warning says so.
    expect(res.body.warnings.join(' ')).toMatch(/below the 120/);
  });

  it('when the robust method gets the EP28-A3c appendix calcium values, then the limits match the published 9.049545–10.199396 to 1e-4', async () => {
    const values = [8.9, 9.2, 9.4, 9.4, 9.5, 9.5, 9.5, 9.6, 9.6, 9.6, 9.6, 9.7, 9.7, 9.7, 9.7, 9.7, 9.8, 9.9, 9.9, 10.2];
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'robust', outliers: 'none', values });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = deriveResultSchema.parse(res.body);
    // CLSI EP28-A3c appendix example as reproduced by the R package mcradds
    // (kaigu1990/mcradds, tests/testthat/test-referenceInterval.R) [confirmed].
    expect(body.n).toBe(20);
    expect(Math.abs(body.lower - 9.049545)).toBeLessThan(1e-4);
    expect(Math.abs(body.upper - 10.199396)).toBeLessThan(1e-4);
  });

  it('when Tukey screening meets a far value, then it is listed as excluded and n counts what is kept', async () => {
    const values = [...range(1, 30).map((v) => 100 + v), 900];
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'tukey', values });
    expect(res.status).toBe(200);
    // Tukey's fences: 900 lies far above Q3 + 1.5·IQR of 101..130 [from memory].
    expect(res.body.excluded).toEqual([900]);
    expect(res.body.n).toBe(30);
  });

  it('when there are too few values for the method, then 400 names the values field', async () => {
    const res = await director.post('/api/reference-intervals/derive').send({ method: 'nonparametric', outliers: 'none', values: range(1, 119) });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields).toHaveProperty('values');
    expect(res.body.error.message).toMatch(/120/);
  });

  it('when a value is not a number or the method is unknown, then 400 names the field', async () => {
    const a = await director.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'none', values: [1, 'x', 3] });
    expect(a.status).toBe(400);
    expect(Object.keys(a.body.error.fields).join()).toMatch(/values/);
    const b = await director.post('/api/reference-intervals/derive').send({ method: 'median', outliers: 'none', values: [1, 2, 3] });
    expect(b.status).toBe(400);
    expect(b.body.error.fields).toHaveProperty('method');
  });

  it('when a technologist derives, then 403; clinicians and admins cannot even list intervals', async () => {
    const res = await technologist.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'none', values: range(1, 20) });
    expect(res.status).toBe(403);
    for (const role of ['clinician', 'admin'] as const) {
      const other = await t.signedIn(role);
      const list = await other.get('/api/reference-intervals');
      expect(list.status).toBe(403);
      expect(list.body.error.code).toBe('FORBIDDEN');
    }
  });

  it('when derive is called, then nothing is stored', async () => {
    const before = await countRows(t.sequelize, 'reference_intervals');
    await director.post('/api/reference-intervals/derive').send({ method: 'mean2sd', outliers: 'none', values: range(1, 20) });
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before);
  });
});

describe('GET /api/reference-intervals', () => {
  it('when the demo database is read, then it lists the invented demo set as approved version 1 by the demo director', async () => {
    const res = await technologist.get('/api/reference-intervals');
    expect(res.status).toBe(200);
    const { items } = intervalListSchema.parse(res.body);
    const demo = items.filter((i) => i.setName === DEMO_INTERVAL_SET_LABEL);
    expect(demo).toHaveLength(demoReferenceIntervals.length);
    for (const i of demo) {
      expect(i.status).toBe('approved');
      expect(i.version).toBe(1);
      expect(i.approvedByName).toBe('Dr Ilse Marchetti');
      expect(i.effectiveFrom).toBe('2025-01-01');
      expect(i.sourceNote).toMatch(/invented/i);
    }
    const ciCs = demo.find((i) => i.assay === 'CI' && i.measure === 'ratio_cs')!;
    const source = demoReferenceIntervals.find((i) => i.assay === 'CI' && i.measure === 'ratio_cs')!;
    expect([ciCs.lower, ciCs.upper]).toEqual([source.lower, source.upper]);
    expect(ciCs.label).toBe('Skeletal muscle · All ages · v1');
  });

  it('when a draft exists, then directors see it in the list and technologists do not', async () => {
    const draft = await createDraft({ assay: 'CII', specimenType: 'heart_muscle' });
    const asDirector = intervalListSchema.parse((await director.get('/api/reference-intervals')).body);
    const asTech = intervalListSchema.parse((await technologist.get('/api/reference-intervals')).body);
    expect(asDirector.items.some((i) => i.id === draft.id && i.status === 'draft')).toBe(true);
    expect(asTech.items.some((i) => i.id === draft.id)).toBe(false);
    expect(asTech.items.every((i) => i.status === 'approved')).toBe(true);
  });
});

describe('versions and approval', () => {
  it('when a new version is approved, then the old one stays readable with its effectiveTo closed on the new start date', async () => {
    const v1 = await approve(await createDraft({ assay: 'CIV', specimenType: 'liver', effectiveFrom: '2025-02-01' }));
    expect(v1.version).toBe(1);
    expect(v1.effectiveTo).toBeNull();
    const draft = await createDraft({ assay: 'CIV', specimenType: 'liver', lower: 60, upper: 160, mean: 110, effectiveFrom: '2026-02-01' });
    expect(draft.version).toBe(2);
    const auditBefore = await countRows(t.sequelize, 'audit_events');
    const v2 = await approve(draft);

    expect(v2.status).toBe('approved');
    expect(v2.approvedByName).toBe('Dr Octavian Brisk-Ferro');
    expect(v2.createdByName).toBe('Dr Ilse Marchetti');
    expect(v2.approvedAt).not.toBeNull();
    const old = storedIntervalSchema.parse((await technologist.get(`/api/reference-intervals/${v1.id}`)).body);
    expect(old.status).toBe('approved');
    expect(old.effectiveTo).toBe('2026-02-01');
    expect([old.lower, old.upper]).toEqual([50, 150]);
    const history = intervalListSchema.parse((await technologist.get(`/api/reference-intervals/${v2.id}/history`)).body);
    expect(history.items.map((i) => i.version)).toEqual([2, 1]);
    // Approval and the closing of v1 are both in the audit trail.
    expect(await countRows(t.sequelize, 'audit_events')).toBe(auditBefore + 2);

    // A comparison made under v1 keeps pointing at v1; the look-up by date finds the right version.
    const onOldDate = await findApplicableInterval({ assay: 'CIV', measure: 'activity', specimenType: 'liver', ageYears: 8, at: new Date('2025-06-01T12:00:00Z') });
    const onNewDate = await findApplicableInterval({ assay: 'CIV', measure: 'activity', specimenType: 'liver', ageYears: 8, at: new Date('2026-06-01T12:00:00Z') });
    expect(onOldDate?.id).toBe(v1.id);
    expect(onNewDate?.id).toBe(v2.id);
    expect(onNewDate?.label).toBe('Liver · All ages · v2');
    expect((await getIntervalById(v1.id))?.upper).toBe(150);
  });

  it('when the effective dates overlap an approved version of the same key, then 409 names effectiveFrom and nothing is saved', async () => {
    await approve(await createDraft({ assay: 'CI+III', specimenType: 'liver', effectiveFrom: '2025-05-01', effectiveTo: '2025-12-01' }));
    const before = await countRows(t.sequelize, 'reference_intervals');
    const res = await director.post('/api/reference-intervals').send(draftBody({ assay: 'CI+III', specimenType: 'liver', effectiveFrom: '2025-09-01' }));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.fields).toHaveProperty('effectiveFrom');
    expect(res.body.error.fields.effectiveFrom).toMatch(/2025-12-01/);
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before);
  });

  it('when a new version would start before the current open-ended one, then 409 names effectiveFrom', async () => {
    await approve(await createDraft({ assay: 'CII+III', specimenType: 'liver', effectiveFrom: '2025-05-01' }));
    const res = await director.post('/api/reference-intervals').send(draftBody({ assay: 'CII+III', specimenType: 'liver', effectiveFrom: '2025-04-01' }));
    expect(res.status).toBe(409);
    expect(res.body.error.fields.effectiveFrom).toMatch(/after 2025-05-01/);
  });

  it('when an age band overlaps another approved band of the same series, then 409 names ageBand', async () => {
    await approve(await createDraft({ assay: 'CI', specimenType: 'liver', ageBand: { label: 'Children', minYears: 0, maxYears: 16 } }));
    const before = await countRows(t.sequelize, 'reference_intervals');
    const res = await director.post('/api/reference-intervals').send(draftBody({ assay: 'CI', specimenType: 'liver', ageBand: { label: 'Teens', minYears: 12, maxYears: 18 } }));
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('ageBand');
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before);
    // Adjacent bands do not overlap ([0,16) and [16, open)).
    const adults = await createDraft({ assay: 'CI', specimenType: 'liver', ageBand: { label: 'Adults', minYears: 16, maxYears: null } });
    expect(adults.label).toBe('Liver · 16 y and over · v1');
  });

  it('when the body is invalid, then 400 names each field and nothing is saved', async () => {
    const before = await countRows(t.sequelize, 'reference_intervals');
    const res = await director.post('/api/reference-intervals').send(draftBody({ lower: 200, upper: 100, effectiveFrom: '2025-13-01', setName: '' }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('upper');
    expect(res.body.error.fields).toHaveProperty('effectiveFrom');
    expect(res.body.error.fields).toHaveProperty('setName');
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before);
  });

  it('when two directors approve with the same revision, then the second gets 409 STALE_VERSION or INVALID_STATE', async () => {
    const draft = await createDraft({ assay: 'CS', specimenType: 'liver' });
    await approve(draft);
    const again = await director.post(`/api/reference-intervals/${draft.id}/approve`).send({ revision: draft.revision });
    expect(again.status).toBe(409);
    expect(['STALE_VERSION', 'INVALID_STATE']).toContain(again.body.error.code);
  });

  it('when a version is retired, then it no longer applies but stays readable with the reason', async () => {
    const v = await approve(await createDraft({ assay: 'CIII', specimenType: 'fibroblasts', effectiveFrom: '2025-01-01' }));
    const at = new Date('2025-07-01T00:00:00Z');
    expect((await findApplicableInterval({ assay: 'CIII', measure: 'activity', specimenType: 'fibroblasts', ageYears: 3, at }))?.id).toBe(v.id);
    const res = await director.post(`/api/reference-intervals/${v.id}/retire`).send({ revision: v.revision, reason: 'Wrong unit typed in' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('retired');
    expect(await findApplicableInterval({ assay: 'CIII', measure: 'activity', specimenType: 'fibroblasts', ageYears: 3, at })).toBeNull();
    const read = await technologist.get(`/api/reference-intervals/${v.id}`);
    expect(read.body.retireReason).toBe('Wrong unit typed in');
    const noReason = await director.post(`/api/reference-intervals/${v.id}/retire`).send({ revision: res.body.revision, reason: '' });
    expect(noReason.status).toBe(400);
  });

  it('when a technologist tries to create or approve, then 403; an unknown id is 404', async () => {
    expect((await technologist.post('/api/reference-intervals').send(draftBody())).status).toBe(403);
    expect((await technologist.post('/api/reference-intervals/1/approve').send({ revision: 0 })).status).toBe(403);
    const missing = await technologist.get('/api/reference-intervals/999999');
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBe('NOT_FOUND');
  });

  it('when a stored interval is handed to the assay engine, then the comparison carries its id, version and label', async () => {
    const found = await findApplicableInterval({ assay: 'CI', measure: 'ratio_cs', specimenType: 'skeletal_muscle', ageYears: 6, at: new Date('2025-06-01T00:00:00Z') });
    expect(found).not.toBeNull();
    const interval = toComparisonInterval(found!);
    const c = compareValue({ assay: 'CI', measure: 'ratio_cs', value: found!.lower / 2 }, interval, { specimenType: 'skeletal_muscle', ageYears: 6 });
    expect(c.position).toBe('below');
    expect(c.interval?.id).toBe(String(found!.id));
    expect(c.interval?.version).toBe(1);
    expect(c.interval?.setLabel).toContain('Skeletal muscle · All ages · v1');
  });
});

// --- control data ------------------------------------------------------------------------------

const HEADER = 'control_id,specimen_type,age_years,CI (nmol/min/mg),CS (nmol/min/mg)';

function controlsCsv(rows: string[]): string {
  return [HEADER, ...rows].join('\n') + '\n';
}

async function upload(csv: string, name = 'controls.csv') {
  return director.post('/api/reference-intervals/controls').attach('file', Buffer.from(csv, 'utf8'), name);
}

/** Reads a column of the seeded demo file ourselves, independent of the server's parser. */
function columnValues(csv: string, column: string, band: { min: number; max: number | null }): number[] {
  const [header, ...lines] = csv.trim().split('\n');
  const names = header!.split(',');
  const col = names.findIndex((n) => n.startsWith(column + ' '));
  const age = names.indexOf('age_years');
  return lines
    .map((l) => l.split(','))
    .filter((cells) => {
      const a = Number(cells[age]);
      return a >= band.min && (band.max === null || a < band.max);
    })
    .map((cells) => Number(cells[col]));
}

describe('control data', () => {
  it('when a valid CSV is uploaded, then it is stored once with its SHA-256 and the series come back', async () => {
    const csv = controlsCsv(range(1, 12).map((i) => `u-${i},skeletal_muscle,${i + 20},${30 + i},${140 + i}`));
    const before = await countRows(t.sequelize, 'uploads');
    const res = await upload(csv);
    expect(res.status).toBe(201);
    const body = controlUploadResponseSchema.parse(res.body);
    expect(body.data.rowCount).toBe(12);
    expect(body.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(body.data.series.some((s) => s.assay === 'CI' && s.measure === 'ratio_cs')).toBe(true);
    expect(await countRows(t.sequelize, 'uploads')).toBe(before + 1);
    const again = await upload(csv, 'same-bytes.csv');
    expect(again.status).toBe(200);
    expect(again.body.alreadyStored).toBe(true);
    expect(again.body.id).toBe(body.id);
    expect(await countRows(t.sequelize, 'uploads')).toBe(before + 1);
  });

  it.each([
    ['a non-numeric cell', ['b-1,skeletal_muscle,30,abc,150'], 2, 'CI (nmol/min/mg)', /not a number/],
    ['a negative activity', ['b-1,skeletal_muscle,30,20,150', 'b-2,skeletal_muscle,31,-4,150'], 3, 'CI (nmol/min/mg)', /negative/],
    ['a missing specimen type', ['b-1,,30,20,150'], 2, 'specimen_type', /Missing specimen type/],
  ])('when the file has %s, then 400 FILE_REJECTED names the row and column and nothing is stored', async (_what, rows, row, column, message) => {
    const before = await countRows(t.sequelize, 'uploads');
    const res = await upload(controlsCsv(rows));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('FILE_REJECTED');
    const issue = res.body.error.issues.find((i: { row: number }) => i.row === row);
    expect(issue, JSON.stringify(res.body.error.issues)).toBeDefined();
    expect(issue.column).toBe(column);
    expect(issue.message).toMatch(message);
    expect(await countRows(t.sequelize, 'uploads')).toBe(before);
  });

  it('when the file mixes units, then 400 names the column', async () => {
    const csv = 'control_id,specimen_type,age_years,CI (nmol/min/mg),CS (umol/min/g)\nm-1,skeletal_muscle,30,20,150\n';
    const res = await upload(csv);
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].column).toBe('CS (umol/min/g)');
    expect(res.body.error.issues[0].message).toMatch(/Mixed units/);
  });

  it('when no file is attached or the file is too large, then 400 names the file field or 413', async () => {
    const none = await director.post('/api/reference-intervals/controls').field('note', 'x');
    expect(none.status).toBe(400);
    expect(none.body.error.fields).toHaveProperty('file');
    const big = await upload(HEADER + '\n' + 'x'.repeat(2 * 1024 * 1024 + 10));
    expect(big.status).toBe(413);
    expect(big.body.error.code).toBe('TOO_LARGE');
  });

  it('when the seeded demo file is previewed by two methods, then mean ± 2 SD matches simple-statistics on the same rows', async () => {
    const list = controlUploadListSchema.parse((await director.get('/api/reference-intervals/controls')).body);
    const demo = list.items.find((u) => u.filename.includes('DEMO'))!;
    expect(demo).toBeDefined();
    const file = await technologist.get(`/api/reference-intervals/controls/${demo.id}/file`).buffer(true).parse((res, cb) => {
      let text = '';
      res.on('data', (c: Buffer) => (text += c.toString('utf8')));
      res.on('end', () => cb(null, text));
    });
    expect(file.status).toBe(200);
    const csv = file.body as string;
    const children = columnValues(csv, 'CI', { min: 0, max: 16 });
    expect(children.length).toBeGreaterThan(30);

    const selection = { specimenType: 'skeletal_muscle', assay: 'CI', measure: 'activity', ageBand: { label: 'Children', minYears: 0, maxYears: 16 }, outliers: 'none' };
    const a = await director.post(`/api/reference-intervals/controls/${demo.id}/preview`).send({ ...selection, method: 'mean2sd' });
    expect(a.status, JSON.stringify(a.body)).toBe(200);
    const pa = controlPreviewSchema.parse(a.body);
    // Reference: simple-statistics on the file's own rows [common practice for mean ± 2 SD].
    expect(pa.result.n).toBe(children.length);
    expect(pa.result.lower).toBeCloseTo(ssMean(children) - 2 * sampleStandardDeviation(children), 8);
    expect(pa.result.upper).toBeCloseTo(ssMean(children) + 2 * sampleStandardDeviation(children), 8);
    expect(pa.values).toHaveLength(children.length);
    expect(pa.partition).not.toBeNull();

    const b = await director.post(`/api/reference-intervals/controls/${demo.id}/preview`).send({ ...selection, method: 'robust' });
    expect(b.status).toBe(200);
    expect(b.body.result.warnings.join(' ')).toMatch(/Robust method/);
    const c = await director.post(`/api/reference-intervals/controls/${demo.id}/preview`).send({ ...selection, method: 'nonparametric' });
    expect(c.status).toBe(400);
    expect(c.body.error.fields).toHaveProperty('method');
  });

  it('when a draft is derived from the demo file and approved, then it records the file and method and closes the demo version', async () => {
    const list = controlUploadListSchema.parse((await director.get('/api/reference-intervals/controls')).body);
    const demo = list.items.find((u) => u.filename.includes('DEMO'))!;
    const before = await countRows(t.sequelize, 'reference_intervals');
    const res = await director.post(`/api/reference-intervals/controls/${demo.id}/draft`).send({
      specimenType: 'skeletal_muscle',
      assay: 'CIV',
      measure: 'activity',
      ageBand: { label: 'All ages', minYears: 0, maxYears: null },
      method: 'nonparametric',
      outliers: 'none',
      setName: 'Muscle 2026 (derived from 130 invented controls)',
      effectiveFrom: '2026-01-01',
      effectiveTo: null,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const draft = storedIntervalSchema.parse(res.body);
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before + 1);
    expect(draft.version).toBe(2);
    expect(draft.method).toBe('nonparametric');
    expect(draft.upload?.id).toBe(demo.id);
    expect(draft.derivation?.outliers).toBe('none');
    expect(draft.derivation?.lowerCi).not.toBeNull();
    expect(draft.sourceNote).toMatch(new RegExp(`control file #${demo.id}`));
    expect(draft.n).toBe(130);

    const v2 = await approve(draft);
    const history = intervalListSchema.parse((await technologist.get(`/api/reference-intervals/${v2.id}/history`)).body);
    const v1 = history.items.find((i) => i.version === 1)!;
    expect(v1.setName).toBe(DEMO_INTERVAL_SET_LABEL);
    expect(v1.effectiveTo).toBe('2026-01-01');
  });

  it('when the draft body names dates in the wrong order or an unknown upload, then 400 or 404 and nothing is saved', async () => {
    const before = await countRows(t.sequelize, 'reference_intervals');
    const body = {
      specimenType: 'skeletal_muscle', assay: 'CI', measure: 'activity', ageBand: { label: 'All', minYears: 0, maxYears: null },
      method: 'mean2sd', outliers: 'none', setName: 'x', effectiveFrom: '2026-05-01', effectiveTo: '2026-01-01',
    };
    const list = controlUploadListSchema.parse((await director.get('/api/reference-intervals/controls')).body);
    const bad = await director.post(`/api/reference-intervals/controls/${list.items.at(-1)!.id}/draft`).send(body);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('effectiveTo');
    const missing = await director.post('/api/reference-intervals/controls/999999/draft').send({ ...body, effectiveTo: null });
    expect(missing.status).toBe(404);
    expect(await countRows(t.sequelize, 'reference_intervals')).toBe(before);
  });
});

describe('verification and partitioning', () => {
  const inside = range(1, 18).map((v) => 10 + v);

  it('when 2 of 20 local values fall outside, then the adopted interval is verified; with 3, test 20 more', async () => {
    // CLSI EP28-A3c: 20 local samples [confirmed], accept when at most 2 fall outside [from memory].
    const ok = await director.post('/api/reference-intervals/verify').send({ lower: 10, upper: 30, values: [...inside, 5, 35] });
    expect(ok.status).toBe(200);
    const okBody = verificationResultSchema.parse(ok.body);
    expect(okBody.decision).toBe('verified');
    expect(okBody.firstRound.outside).toBe(2);
    const more = await director.post('/api/reference-intervals/verify').send({ lower: 10, upper: 30, values: [...inside.slice(1), 5, 35, 40] });
    expect(more.body.decision).toBe('test_more');
    expect(more.body.firstRound.outside).toBe(3);
  });

  it('when fewer than 20 values are sent, then 400 names values', async () => {
    const res = await director.post('/api/reference-intervals/verify').send({ lower: 10, upper: 30, values: inside.slice(0, 10) });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('values');
  });

  it('when two groups are checked, then z and its critical value follow Harris & Boyd', async () => {
    const a = range(1, 60).map((v) => 30 + (v % 10));
    const b = range(1, 60).map((v) => 36 + (v % 10));
    const res = await director.post('/api/reference-intervals/partition').send({ groups: [{ label: 'children', values: a }, { label: 'adults', values: b }] });
    expect(res.status).toBe(200);
    const body = partitionCheckResultSchema.parse(res.body);
    // Harris EK, Boyd JC, Clin Chem 1990;36:265–270 [confirmed]: z = |x̄1 − x̄2| / √(s1²/n1 + s2²/n2),
    // critical 3·√((n1 + n2)/240). Computed here with simple-statistics.
    const z = Math.abs(ssMean(a) - ssMean(b)) / Math.sqrt(sampleStandardDeviation(a) ** 2 / 60 + sampleStandardDeviation(b) ** 2 / 60);
    expect(body.z).toBeCloseTo(z, 10);
    expect(body.zCritical).toBeCloseTo(3 * Math.sqrt(120 / 240), 10);
    expect(body.decision).toBe(z > 3 * Math.sqrt(0.5) ? 'partition' : 'combine');
  });
});
