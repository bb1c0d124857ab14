import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cohortComplexes, type CohortPage, type CohortPlots, type SavedSearch } from '@/schemas/registry';
import type { ReportResult } from '@/schemas/report-document';
import { createMigrator } from '../../server/db/migrate';
import { measureColumns, writeCohortRows, type CohortSection, type CohortSource } from '../../server/modules/registry/cohort-rows';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Cohort search (issue 13). Three parts:
 * 1. Rows come from signing: every signed demo case is one member, a correction signed through the API replaces
 *    the earlier version's rows, and migration 0016's backfill rebuilds the same rows from the stored reports.
 * 2. Each filter narrows a hand-built cohort to the members listed beside it, worked out by hand from the table
 *    below (not from the code), plus paging and order.
 * 3. Roles, bad filters (400 naming the field) and saved searches per user.
 */

let t: TestApp;
let tech: Awaited<ReturnType<TestApp['signedIn']>>;
let director: Awaited<ReturnType<TestApp['signedIn']>>;

beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
  director = await t.signedIn('director');
}, 120_000);
afterAll(() => t.close());

type Row = Record<string, unknown>;
const query = async (sql: string, replacements: Record<string, unknown> = {}) =>
  (await t.sequelize.query(sql, { replacements }))[0] as Row[];

const cohort = async (qs: string) => {
  const res = await tech.get(`/api/registry/cohort?pageSize=200&${qs}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as CohortPage;
};
/** "TEST-B/B2"-style keys of the members, sorted. */
const keysOf = (page: CohortPage) => page.items.map((m) => `${m.accession}/${m.specimenLabel}`).sort();

describe('rows written at signing', () => {
  it('holds one member per signed case, at its current version', async () => {
    const signed = await query(`SELECT id FROM cases WHERE state IN ('final', 'corrected')`);
    const page = await cohort('');
    expect(page.total).toBe(signed.length);
    expect(new Set(page.items.map((m) => m.caseId))).toEqual(new Set(signed.map((c) => c.id)));
    // Every member is the newest signed version of its case (a superseded version is never a member).
    const current = await query(`SELECT id, "caseId", version FROM reports WHERE "supersededByReportId" IS NULL`);
    for (const m of page.items) {
      expect(current.find((r) => r.caseId === m.caseId)).toMatchObject({ id: m.reportId, version: m.reportVersion });
    }
  });

  it('a corrected report signed through the API replaces its case’s rows in the same step', async () => {
    const [target] = await query(`SELECT id, version FROM cases WHERE state = 'final' ORDER BY id LIMIT 1`);
    const before = (await cohort('')).items.filter((m) => m.caseId === target!.id);
    expect(before).toHaveLength(1);
    expect(before[0]!.reportStatus).toBe('final');
    const res = await director.post(`/api/cases/${String(target!.id)}/correct`).send({
      password: DEMO_PASSWORD,
      reason: 'Invented correction for the cohort test',
      changesSummary: 'Wording of the interpretation only',
      version: target!.version,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const after = (await cohort('')).items.filter((m) => m.caseId === target!.id);
    expect(after).toHaveLength(1);
    expect(after[0]).toMatchObject({ reportId: res.body.report.id, reportVersion: 2, reportStatus: 'corrected' });
    // The values are what the new version printed, row for row.
    const [stored] = await query(`SELECT document FROM reports WHERE id = :id`, { id: res.body.report.id });
    const printed = (JSON.parse(String(stored!.document)) as { specimens: { results: ReportResult[] }[] }).specimens.flatMap((s) => s.results);
    expect(after[0]!.values.map((v) => [v.assay, v.measure, v.value, v.pctOfMean])).toEqual(
      printed.map((r) => [r.assay, r.measure, r.value, r.pctOfMean]),
    );
  });

  it('after that correction the plots of every signed case count each member once, bin for bin', async () => {
    expect(await expectPlotsMatchRows('')).toBeGreaterThan(0);
  });

  it('the migration’s backfill rebuilds the same rows from the stored reports', async () => {
    /** Each member's plot cells, by key (ids may differ once rebuilt). */
    const memberCells = async () => {
      const keyOf = new Map((await query('SELECT id, "key" FROM cohort_plot_cells')).map((c) => [Number(c.id), String(c.key)]));
      const rows = await query('SELECT "caseId", "specimenLabel", "plotCells" FROM cohort_members ORDER BY "caseId", "specimenLabel"');
      return rows.map((r) => [r.caseId, r.specimenLabel, String(r.plotCells ?? '').split(',').filter(Boolean).map((id) => keyOf.get(Number(id))).sort()]);
    };
    const snapshot = async () => ({
      // Migration 0018's cells: the same keys with the same counts, and each member in the same cells.
      cells: await query(`SELECT "key", n FROM cohort_plot_cells WHERE n > 0 ORDER BY "key"`),
      memberCells: await memberCells(),
      // With every measure column of migration 0017: its own backfill (from cohort_values) must give what signing wrote.
      members: await query(`SELECT "reportId", "caseId", "specimenId", accession, "reportVersion", "reportStatus", "specimenLabel",
        "specimenType", sex, "ageYears", "signedOn", "patternCode", "isIsolated", "lowCIV", ${measureColumns.map((c) => `"${c}"`).join(', ')}
        FROM cohort_members ORDER BY "caseId", "specimenLabel"`),
      values: await query(`SELECT m."caseId", v.assay, v.measure, v.value, v."pctOfMean", v.lower, v.upper, v.mean
        FROM cohort_values v JOIN cohort_members m ON m.id = v."memberId" ORDER BY m."caseId", v.id`),
    });
    const atSigning = await snapshot();
    expect(atSigning.members.length).toBeGreaterThan(0);
    // Signing filled the columns: CI/CS of each member is the value its report printed.
    for (const m of atSigning.members) {
      const printed = atSigning.values.find((v) => v.caseId === m.caseId && v.assay === 'CI' && v.measure === 'ratio_cs');
      expect(m.CI_ratio_cs_value).toBe(printed?.value ?? null);
    }
    const migrator = createMigrator(t.sequelize);
    await migrator.down({ to: '0016-cohorts' });
    await migrator.up();
    expect(await snapshot()).toEqual(atSigning);
  });
});

/* ---------------------------------------------------------------- hand-built cohort */

const result = (assay: ReportResult['assay'], measure: ReportResult['measure'], value: number, pctOfMean: number, lower: number, upper: number, mean: number): ReportResult => ({
  assay,
  assayName: assay,
  measure,
  value,
  unit: measure === 'activity' ? 'nmol/min/mg protein' : 'ratio',
  referenceLower: lower,
  referenceUpper: upper,
  referenceMean: mean,
  intervalLabel: 'Invented controls',
  intervalVersion: 1,
  status: 'within',
  pctOfMean,
  criterionBand: null,
  flags: [],
});
const ciCs = (value: number, pct: number) => result('CI', 'ratio_cs', value, pct, 0.15, 0.35, 0.25);
const civCs = (value: number, pct: number) => result('CIV', 'ratio_cs', value, pct, 0.7, 1.7, 1.2);
const section = (label: string, type: CohortSection['type'], ageYears: number | null, findings: CohortSection['findings'], results: ReportResult[]): CohortSection => ({
  specimenId: null,
  label,
  type,
  ageYears,
  findings,
  results,
});

/*
 * The hand-built cohort (invented values). Age is completed years at collection.
 *
 * member  | sex    | signed on  | type            | age  | findings                  | CI/CS (% mean) | CIV/CS (% mean) | other
 * TEST-A/A1 | female | 2025-01-15 | skeletal muscle | 0.5 → 0 | isolated CI           | 0.05 (20)      | 1.2 (100)       |
 * TEST-B/B1 | male   | 2025-03-01 | skeletal muscle | 4.99 → 4 | combined CI, CIV     | 0.10 (40)      | 0.36 (30)       |
 * TEST-B/B2 | male   | 2025-03-01 | liver           | 4.99 → 4 | normal               | 0.25 (100)     | 1.2 (100)       |
 * TEST-C/C1 | female | 2025-06-30 | fibroblasts     | 17.2 → 17 | isolated CIV + raised CS | 0.25 (100) | 0.48 (40)       |
 * TEST-D/D1 | other  | 2026-01-10 | skeletal muscle | 70   | low CI+III only           | 0.20 (80)      | —               | CI+III/CS 0.09 (30)
 * TEST-D/D2 | other  | 2026-01-10 | heart muscle    | —    | none read                 | 0.30 (120)     | —               |
 */
function handBuilt(caseIds: number[], reportId: number): CohortSource[] {
  const source = (i: number, accession: string, sex: string, signedOn: string, sections: CohortSection[]): CohortSource => ({
    reportId,
    caseId: caseIds[i]!,
    accession,
    reportVersion: 1,
    reportStatus: 'final',
    sex,
    signedOn,
    sections,
  });
  return [
    source(0, 'TEST-A', 'female', '2025-01-15', [
      section('A1', 'skeletal_muscle', 0.5, [{ kind: 'isolated_deficiency', complexes: ['CI'] }], [
        ciCs(0.05, 20),
        civCs(1.2, 100),
        result('CS', 'activity', 150, 100, 90, 210, 150),
      ]),
    ]),
    source(1, 'TEST-B', 'male', '2025-03-01', [
      section('B1', 'skeletal_muscle', 4.99, [{ kind: 'combined_deficiency', complexes: ['CI', 'CIV'] }], [ciCs(0.1, 40), civCs(0.36, 30)]),
      section('B2', 'liver', 4.99, [{ kind: 'normal', complexes: [] }], [ciCs(0.25, 100), civCs(1.2, 100)]),
    ]),
    source(2, 'TEST-C', 'female', '2025-06-30', [
      section('C1', 'fibroblasts', 17.2, [{ kind: 'isolated_deficiency', complexes: ['CIV'] }, { kind: 'raised_cs', complexes: [] }], [
        ciCs(0.25, 100),
        civCs(0.48, 40),
      ]),
    ]),
    source(3, 'TEST-D', 'other', '2026-01-10', [
      section('D1', 'skeletal_muscle', 70, [{ kind: 'linked_activity_low', complexes: ['CI+III'] }], [
        ciCs(0.2, 80),
        result('CI+III', 'ratio_cs', 0.09, 30, 0.16, 0.44, 0.3),
      ]),
      section('D2', 'heart_muscle', null, null, [ciCs(0.3, 120)]),
    ]),
  ];
}

describe('filters over a hand-built cohort', () => {
  beforeAll(async () => {
    await t.sequelize.query('DELETE FROM cohort_values');
    await t.sequelize.query('DELETE FROM cohort_members');
    await t.sequelize.query('DELETE FROM cohort_plot_cells');
    const cases = await query('SELECT id FROM cases ORDER BY id LIMIT 4');
    const [report] = await query('SELECT id FROM reports ORDER BY id LIMIT 1');
    for (const s of handBuilt(cases.map((c) => Number(c.id)), Number(report!.id))) await writeCohortRows(t.sequelize, s);
  });

  const ALL = ['TEST-A/A1', 'TEST-B/B1', 'TEST-B/B2', 'TEST-C/C1', 'TEST-D/D1', 'TEST-D/D2'];
  it.each([
    ['', ALL],
    ['pattern=isolated', ['TEST-A/A1', 'TEST-C/C1']],
    ['pattern=combined', ['TEST-B/B1']],
    ['pattern=normal', ['TEST-B/B2']],
    ['pattern=raised_cs', ['TEST-C/C1']],
    ['pattern=linked', ['TEST-D/D1']],
    ['pattern=insufficient', []],
    // A complex counts when a deficiency finding names it: CI+III (D1) is not CI.
    ['complex=CI', ['TEST-A/A1', 'TEST-B/B1']],
    ['complex=CIV', ['TEST-B/B1', 'TEST-C/C1']],
    [`complex=${encodeURIComponent('CI+III')}`, ['TEST-D/D1']],
    ['specimenType=skeletal_muscle', ['TEST-A/A1', 'TEST-B/B1', 'TEST-D/D1']],
    ['specimenType=fibroblasts', ['TEST-C/C1']],
    // Completed years: 0.5 is under 1; 4.99 is still 4; D2 has no age and falls in no band.
    ['ageBand=under_1', ['TEST-A/A1']],
    ['ageBand=1_to_4', ['TEST-B/B1', 'TEST-B/B2']],
    ['ageBand=5_to_17', ['TEST-C/C1']],
    ['ageBand=18_to_64', []],
    ['ageBand=65_plus', ['TEST-D/D1']],
    ['sex=female', ['TEST-A/A1', 'TEST-C/C1']],
    ['sex=male', ['TEST-B/B1', 'TEST-B/B2']],
    ['sex=other', ['TEST-D/D1', 'TEST-D/D2']],
    // Both ends of the report-date range are included.
    ['signedFrom=2025-03-01&signedTo=2025-06-30', ['TEST-B/B1', 'TEST-B/B2', 'TEST-C/C1']],
    ['signedFrom=2025-07-01', ['TEST-D/D1', 'TEST-D/D2']],
    ['signedTo=2025-01-15', ['TEST-A/A1']],
    // Ranges: bounds included; a member without that value is not in range.
    ['range=CI:ratio_cs:pct::40', ['TEST-A/A1', 'TEST-B/B1']],
    ['range=CI:ratio_cs:value:0.2:0.25', ['TEST-B/B2', 'TEST-C/C1', 'TEST-D/D1']],
    ['range=CIV:ratio_cs:pct:30:40', ['TEST-B/B1', 'TEST-C/C1']],
    ['range=CS:activity:value:100:', ['TEST-A/A1']],
    // Conditions combine with AND.
    ['range=CI:ratio_cs:pct::50&range=CIV:ratio_cs:pct::50', ['TEST-B/B1']],
    ['complex=CIV&range=CI:ratio_cs:pct:90:', ['TEST-C/C1']],
    ['pattern=isolated&sex=female&ageBand=5_to_17&specimenType=fibroblasts', ['TEST-C/C1']],
  ])('%s → %j', async (qs, expected) => {
    const page = await cohort(qs);
    expect(keysOf(page)).toEqual(expected);
    expect(page.total).toBe(expected.length);
  });

  it('pages on the server, newest report date first (then the later row), with the total on every page', async () => {
    // By hand: D2 and D1 share 2026-01-10 (D2 written after D1), then C1, B2 and B1 (same day, B2 later), A1.
    const order = ['TEST-D/D2', 'TEST-D/D1', 'TEST-C/C1', 'TEST-B/B2', 'TEST-B/B1', 'TEST-A/A1'];
    const pages = await Promise.all([1, 2, 3].map((p) => tech.get(`/api/registry/cohort?pageSize=4&page=${p}`)));
    const [p1, p2, p3] = pages.map((r) => r.body as CohortPage);
    expect(p1!.items.map((m) => `${m.accession}/${m.specimenLabel}`)).toEqual(order.slice(0, 4));
    expect(p2!.items.map((m) => `${m.accession}/${m.specimenLabel}`)).toEqual(order.slice(4));
    expect(p3!.items).toEqual([]);
    for (const p of [p1, p2, p3]) expect(p!.total).toBe(6);
    const byAge = await cohort('sort=ageYears&dir=desc&ageBand=1_to_4');
    expect(byAge.items.map((m) => m.ageYears)).toEqual([4, 4]);
    const byAccession = await cohort('sort=accession&dir=asc');
    expect(byAccession.items.map((m) => m.accession)).toEqual(['TEST-A', 'TEST-B', 'TEST-B', 'TEST-C', 'TEST-D', 'TEST-D']);
  });

  it('plots: the CI/CS distribution in round bins with the interval, and % of mean quartiles (nearest rank)', async () => {
    const res = await tech.get('/api/registry/cohort/plots');
    expect(res.status).toBe(200);
    const plots = res.body as CohortPlots;
    expect(plots.total).toBe(6);
    const ci = plots.ratioToCs.find((p) => p.assay === 'CI')!;
    expect(ci.n).toBe(6);
    expect(ci.interval).toEqual({ lower: 0.15, upper: 0.35, mean: 0.25, n: 6 });
    // CI/CS values 0.05, 0.10, 0.20, 0.25, 0.25, 0.30 in bins 0.02 wide (the round width nearest 0.42 / 24 from above):
    // 0.04–0.06: 1, 0.10–0.12: 1, 0.20–0.22: 1, 0.24–0.26: 2, 0.30–0.32: 1.
    expect(ci.binWidth).toBeCloseTo(0.02, 12);
    const nonEmpty = ci.bins.filter((b) => b.count > 0).map((b) => [Number(b.from.toFixed(2)), b.count]);
    expect(nonEmpty).toEqual([[0.04, 1], [0.1, 1], [0.2, 1], [0.24, 2], [0.3, 1]]);
    // CI/CS as % of mean: 20, 40, 80, 100, 100, 120. Nearest-rank quantiles [common practice: the smallest value
    // with at least q·n values at or below it]: Q1 rank ⌈1.5⌉ = 2 → 40; median rank 3 → 80; Q3 rank ⌈4.5⌉ = 5 → 100.
    expect(plots.pctOfMean.find((p) => p.assay === 'CI')).toEqual({ assay: 'CI', n: 6, min: 20, q1: 40, median: 80, q3: 100, max: 120 });
    // The plots follow the filter: only the two women (CIV/CS 100 and 40).
    const women = (await tech.get('/api/registry/cohort/plots?sex=female')).body as CohortPlots;
    expect(women.total).toBe(2);
    expect(women.pctOfMean.find((p) => p.assay === 'CIV')).toMatchObject({ n: 2, min: 40, median: 40, max: 100 });
    expect(women.pctOfMean.find((p) => p.assay === 'CII')).toMatchObject({ n: 0, median: null });
  });
});

describe('who may search, and bad filters', () => {
  const routes: [string, string][] = [
    ['get', '/api/registry/cohort'],
    ['get', '/api/registry/cohort/plots'],
    ['get', '/api/registry/saved-searches'],
    ['post', '/api/registry/saved-searches'],
    ['delete', '/api/registry/saved-searches/1'],
  ];
  it.each(['clinician', 'admin'] as const)('%s: 403 on every cohort route', async (role) => {
    const agent = await t.signedIn(role);
    for (const [method, path] of routes) {
      const res = await (method === 'get' ? agent.get(path) : method === 'post' ? agent.post(path).send({ name: 'x', filters: {} }) : agent.delete(path));
      expect(res.status, `${method} ${path}`).toBe(403);
    }
  });

  it('without a session: 401', async () => {
    expect((await t.agent().get('/api/registry/cohort')).status).toBe(401);
  });

  it.each([
    ['ageBand=teenager', 'ageBand'],
    ['pattern=odd', 'pattern'],
    ['complex=CS', 'complex'],
    ['sex=x', 'sex'],
    ['specimenType=bone', 'specimenType'],
    ['signedFrom=2025-02-30', 'signedFrom'],
    ['signedFrom=2025-03-01&signedTo=2025-01-01', 'signedTo'],
    ['range=CI:ratio_cs:pct:50:40', 'range.0.max'],
    ['range=CI:ratio_cs:pct:abc:', 'range.0.min'],
    ['range=CI:ratio_cs:pct', 'range.0'],
    ['range=CI:activity:pct::40&range=CS:ratio_cs:value:1:', 'range.1.measure'],
    ['range=CX:activity:value:1:2', 'range.0.assay'],
    ['range=CI:activity:percent:1:2', 'range.0.scale'],
    ['page=0', 'page'],
    ['pageSize=500', 'pageSize'],
    ['colour=blue', 'colour'],
  ])('%s → 400 naming %s', async (qs, field) => {
    const res = await tech.get(`/api/registry/cohort?${qs}`);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(Object.keys(res.body.error.fields)).toContain(field);
  });
});

describe('saved searches', () => {
  it('each user keeps, lists, runs and deletes their own; nobody else sees or deletes them', async () => {
    const filters = { pattern: 'isolated', sex: 'female', range: ['CI:ratio_cs:pct::40'] };
    const created = await tech.post('/api/registry/saved-searches').send({ name: 'Isolated, girls and women', filters });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const mine = created.body as SavedSearch;
    expect(mine).toMatchObject({ name: 'Isolated, girls and women', filters });

    const techList = (await tech.get('/api/registry/saved-searches')).body.items as SavedSearch[];
    expect(techList.map((s) => s.id)).toContain(mine.id);
    const directorList = (await director.get('/api/registry/saved-searches')).body.items as SavedSearch[];
    expect(directorList.map((s) => s.id)).not.toContain(mine.id);

    // Running it: its filters as the query string. By hand from the table: isolated + female + CI ≤ 40% → A1.
    const qs = new URLSearchParams({ pattern: 'isolated', sex: 'female', range: 'CI:ratio_cs:pct::40' });
    expect(keysOf(await cohort(qs.toString()))).toEqual(['TEST-A/A1']);

    const audit = await query(`SELECT action FROM audit_events WHERE entity = 'saved-search' AND "entityId" = :id`, { id: String(mine.id) });
    expect(audit.map((a) => a.action)).toEqual(['create']);

    // Another user's search: 404, and it stays.
    expect((await director.delete(`/api/registry/saved-searches/${mine.id}`)).status).toBe(404);
    expect(await countRows(t.sequelize, 'saved_searches')).toBe(1);
    expect((await tech.delete(`/api/registry/saved-searches/${mine.id}`)).status).toBe(204);
    expect(await countRows(t.sequelize, 'saved_searches')).toBe(0);
    expect((await tech.delete(`/api/registry/saved-searches/${mine.id}`)).status).toBe(404);
  });

  it('bad input is refused with the field named, and nothing is written', async () => {
    const cases: [unknown, string][] = [
      [{ name: '', filters: {} }, 'name'],
      [{ name: 'x', filters: { ageBand: 'old' } }, 'filters.ageBand'],
      [{ name: 'x', filters: { range: ['CI:ratio_cs:pct:9:1'] } }, 'filters.range.0.max'],
      [{ name: 'x', filters: { page: 2 } }, 'filters.page'],
      [{ name: 'x' }, 'filters'],
    ];
    for (const [body, field] of cases) {
      const res = await tech.post('/api/registry/saved-searches').send(body as object);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(Object.keys(res.body.error.fields)).toContain(field);
    }
    expect(await countRows(t.sequelize, 'saved_searches')).toBe(0);
  });

  it('the same name saved six times at once: one is kept, five get 409 naming the field', async () => {
    const answers = await Promise.all(
      Array.from({ length: 6 }, () => tech.post('/api/registry/saved-searches').send({ name: 'Twice', filters: { pattern: 'combined' } })),
    );
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409, 409, 409, 409, 409]);
    for (const a of answers.filter((x) => x.status === 409)) expect(Object.keys(a.body.error.fields)).toEqual(['name']);
    expect(await countRows(t.sequelize, 'saved_searches')).toBe(1);
    // Another user may use the same name.
    expect((await director.post('/api/registry/saved-searches').send({ name: 'Twice', filters: {} })).status).toBe(201);
  });
});

/* ---------------------------------------------------------------- plots against the rows */

/** Deterministic noise (mulberry32), so the random cohort is the same on every run. */
function noise(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let x = Math.imul(s ^ (s >>> 15), s | 1);
    x ^= x + Math.imul(x ^ (x >>> 7), x | 61);
    return ((x ^ (x >>> 14)) >>> 0) / 4294967296;
  };
}

const COMPLEX_INTERVALS: Record<string, [number, number, number][]> = {
  // Two invented intervals per complex (lower, upper, mean), the first met more often.
  CI: [[0.15, 0.35, 0.25], [0.12, 0.3, 0.21]],
  CII: [[0.12, 0.28, 0.2], [0.1, 0.26, 0.18]],
  CIII: [[0.5, 1.1, 0.8], [0.4, 1.0, 0.7]],
  CIV: [[0.7, 1.7, 1.2], [0.6, 1.5, 1.05]],
  'CI+III': [[0.16, 0.44, 0.3], [0.14, 0.4, 0.27]],
  'CII+III': [[0.15, 0.4, 0.27], [0.13, 0.36, 0.24]],
};

/**
 * 240 invented specimens over four cases: each complex's CI/CS-style ratio drawn from 0 to 3 × its upper limit
 * (a long tail past the drawn bins), read against one of two intervals, or against none (then no % of mean),
 * and sometimes not measured at all.
 */
function randomCohort(caseIds: number[], reportId: number): CohortSource[] {
  const r = noise(13);
  const types: CohortSection['type'][] = ['skeletal_muscle', 'skeletal_muscle', 'liver', 'fibroblasts'];
  const kinds: CohortSection['findings'][] = [[{ kind: 'normal', complexes: [] }], [{ kind: 'isolated_deficiency', complexes: ['CI'] }], [{ kind: 'combined_deficiency', complexes: ['CI', 'CIV'] }]];
  return caseIds.map((caseId, c) => ({
    reportId,
    caseId,
    accession: `RAND-${c}`,
    reportVersion: 1,
    reportStatus: 'final',
    sex: c % 2 ? 'male' : 'female',
    signedOn: `2025-0${c + 1}-15`,
    sections: Array.from({ length: 60 }, (_, i) =>
      section(`R${i}`, types[Math.floor(r() * types.length)]!, Math.floor(r() * 80), kinds[Math.floor(r() * kinds.length)]!,
        Object.entries(COMPLEX_INTERVALS).flatMap(([assay, choices]): ReportResult[] => {
          if (r() < 0.1) return [];
          const [lower, upper, mean] = choices[r() < 0.7 ? 0 : 1]!;
          const value = r() * 3 * upper;
          if (r() < 0.08) return [{ ...result(assay as ReportResult['assay'], 'ratio_cs', value, 0, 0, 0, 0), referenceLower: null, referenceUpper: null, referenceMean: null, pctOfMean: null }];
          return [result(assay as ReportResult['assay'], 'ratio_cs', value, (value / mean) * 100, lower, upper, mean)];
        }),
      ),
    ),
  }));
}

/** Nearest rank [common practice]: the smallest value with at least q·n of the values at or below it. */
const nearestRank = (sorted: number[], q: number) => sorted[Math.max(1, Math.ceil(q * sorted.length)) - 1]!;

/** Every member of the cohort with its values, read page by page through the search. */
async function everyMember(qs: string) {
  const first = await cohort(qs);
  const pages = await Promise.all(Array.from({ length: Math.ceil(first.total / 200) - 1 }, (_, i) => cohort(`${qs}&page=${i + 2}`)));
  return { total: first.total, members: [first, ...pages].flatMap((p) => p.items) };
}

/**
 * The plots of a filter against counts made here from the cohort's rows (its members' printed values, read through
 * the search): sizes, the interval most values were read against, every bin, and the nearest-rank quartiles.
 * Answers the cohort's size.
 */
async function expectPlotsMatchRows(qs: string): Promise<number> {
  const [{ total, members }, res] = await Promise.all([everyMember(qs), tech.get(`/api/registry/cohort/plots?${qs}`)]);
  expect(res.status).toBe(200);
  const plots = res.body as CohortPlots;
  expect(plots.total, qs).toBe(total);
  for (const assay of cohortComplexes) {
    const rows = members.flatMap((m) => m.values).filter((v) => v.assay === assay && v.measure === 'ratio_cs');
    const values = rows.filter((v) => v.value !== null).map((v) => v.value!);
    const ratio = plots.ratioToCs.find((p) => p.assay === assay)!;
    expect(ratio.n, `${qs} ${assay}`).toBe(values.length);

    // The interval shaded is the one most of the cohort's values were read against, counted here by hand.
    const tally = new Map<string, number>();
    for (const v of rows) if (v.value !== null && v.lower !== null && v.upper !== null) tally.set(JSON.stringify([v.lower, v.upper]), (tally.get(JSON.stringify([v.lower, v.upper])) ?? 0) + 1);
    const modal = [...tally].sort((a, b) => b[1] - a[1])[0];
    if (modal) {
      expect([ratio.interval!.lower, ratio.interval!.upper], `${qs} ${assay}`).toEqual(JSON.parse(modal[0]));
      expect(ratio.interval!.n).toBe(modal[1]);
    } else expect(ratio.interval, `${qs} ${assay}`).toBeNull();

    // Every bin: the values from its lower edge up to the next bin's, the last bin taking the tail.
    const edges = ratio.bins.map((b) => b.from);
    const counted = edges.map((from, i) => values.filter((v) => v >= from && (i === edges.length - 1 || v < edges[i + 1]!)).length);
    expect(ratio.bins.map((b) => b.count), `${qs} ${assay} bins`).toEqual(counted);
    expect(counted.reduce((a, b) => a + b, 0)).toBe(values.length);
    // Round widths: 1, 2 or 5 times a power of ten, the bins reaching past the interval's upper limit.
    const mantissa = ratio.binWidth / 10 ** Math.floor(Math.log10(ratio.binWidth) + 1e-9);
    expect([1, 2, 5].some((m) => Math.abs(mantissa - m) < 1e-9), `${assay} width ${ratio.binWidth}`).toBe(true);
    if (ratio.interval) expect(edges.at(-1)!).toBeGreaterThanOrEqual(ratio.interval.upper);

    // % of mean in whole percent, then nearest-rank quartiles of those.
    const pcts = rows.filter((v) => v.pctOfMean !== null).map((v) => Math.floor(v.pctOfMean!)).sort((a, b) => a - b);
    expect(plots.pctOfMean.find((p) => p.assay === assay), `${qs} ${assay} % of mean`).toEqual(
      pcts.length === 0
        ? { assay, n: 0, min: null, q1: null, median: null, q3: null, max: null }
        : { assay, n: pcts.length, min: pcts[0], q1: nearestRank(pcts, 0.25), median: nearestRank(pcts, 0.5), q3: nearestRank(pcts, 0.75), max: pcts.at(-1) },
    );
  }
  return total;
}

// Last: it replaces the hand-built cohort the tests above read.
describe('plots agree with counts made from the rows', () => {
  beforeAll(async () => {
    await t.sequelize.query('DELETE FROM cohort_values');
    await t.sequelize.query('DELETE FROM cohort_members');
    await t.sequelize.query('DELETE FROM cohort_plot_cells');
    const cases = await query('SELECT id FROM cases ORDER BY id LIMIT 4');
    const [report] = await query('SELECT id FROM reports ORDER BY id LIMIT 1');
    for (const s of randomCohort(cases.map((c) => Number(c.id)), Number(report!.id))) await writeCohortRows(t.sequelize, s);
  });

  it.each(['', 'pattern=isolated', 'range=CI:ratio_cs:pct::60', 'specimenType=skeletal_muscle&sex=female', 'range=CIV:ratio_cs:value:1:&complex=CI'])(
    'filter "%s": sizes, intervals, every bin and the quartiles match the rows',
    async (qs) => {
      expect(await expectPlotsMatchRows(qs)).toBeGreaterThan(0);
    },
  );

  /** The random cohort's case `i` as first signed (the same noise, so the same rows as beforeAll wrote). */
  async function randomCase(i: number): Promise<CohortSource> {
    const cases = await query('SELECT id FROM cases ORDER BY id LIMIT 4');
    const [report] = await query('SELECT id FROM reports ORDER BY id LIMIT 1');
    return randomCohort(cases.map((c) => Number(c.id)), Number(report!.id))[i]!;
  }

  it('a case signed again with other values (a corrected version): its members leave their old cells, and the plots match the rows again', async () => {
    const original = await randomCase(1);
    // Version 2 prints half of every ratio of its first 40 specimens and drops the other 20 (an invented correction).
    const halved = (r: ReportResult): ReportResult => ({ ...r, value: r.value === null ? null : r.value / 2, pctOfMean: r.pctOfMean === null ? null : r.pctOfMean / 2 });
    await writeCohortRows(t.sequelize, {
      ...original,
      reportVersion: 2,
      reportStatus: 'corrected',
      sections: original.sections.slice(0, 40).map((s) => ({ ...s, results: s.results.map(halved) })),
    });
    for (const qs of ['', 'pattern=isolated', 'range=CI:ratio_cs:pct::60', 'sex=male&specimenType=liver']) await expectPlotsMatchRows(qs);
    // Together the cells hold one count per printed ratio (or % of mean), counted from the rows; the cells the old
    // values left are empty (kept, at 0), none below.
    const { members } = await everyMember('');
    const printed = members.flatMap((m) => m.values).filter((v) => v.measure === 'ratio_cs' && (v.value !== null || v.pctOfMean !== null)).length;
    const [cells] = await query('SELECT SUM(n) AS held, SUM(CASE WHEN n = 0 THEN 1 ELSE 0 END) AS empty, MIN(n) AS least FROM cohort_plot_cells');
    expect({ held: Number(cells!.held), least: Number(cells!.least) }).toEqual({ held: printed, least: 0 });
    expect(Number(cells!.empty)).toBeGreaterThan(0);
  });

  it('a signing that fails after the rows were written leaves the rows and the cells as they were (one transaction)', async () => {
    const before = (await tech.get('/api/registry/cohort/plots')).body as CohortPlots;
    const cellsBefore = await query('SELECT id, "key", n FROM cohort_plot_cells ORDER BY id');
    const other = await randomCase(2);
    await expect(
      t.sequelize.transaction(async (transaction) => {
        await writeCohortRows(t.sequelize, { ...other, reportVersion: 2, sections: other.sections.slice(0, 5) }, transaction);
        throw new Error('invented failure after the cohort rows were written');
      }),
    ).rejects.toThrow('invented failure');
    expect(await query('SELECT id, "key", n FROM cohort_plot_cells ORDER BY id')).toEqual(cellsBefore);
    expect((await tech.get('/api/registry/cohort/plots')).body).toEqual(before);
  });
});
