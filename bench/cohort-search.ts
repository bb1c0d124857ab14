import fs from 'node:fs';
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { PatternKind } from '@/schemas/assay';
import type { AssayCode, SpecimenType } from '@/schemas/common';
import type { ReportResult } from '@/schemas/report-document';
import { cohortComplexes, type CohortCriteria, type CohortFilter } from '@/schemas/registry';
import { cohortPlots, findCohort } from '../server/modules/registry/cohort.repository';
import { joinPlotCells } from '../server/modules/registry/cohort-plot-cells';
import { cohortMeasures, cohortRowsOf, type CohortFinding } from '../server/modules/registry/cohort-rows';
import { ageInYears } from '../server/modules/results/results.service';
import { bulkInsert, openRegistryDatabase, pick, rng, runWhenMain, seedRegistry, signedInAgent, sqlDate, time } from './cases-list';
import type { BenchResult } from './types';

/*
 * Cohort search at registry scale: the 100 000 invented cases of the case-list benchmark, every one given a signed
 * report and its cohort rows (one member, 18 values: six complexes' activity and ratios, CS), then findCohort,
 * cohortPlots and GET /api/registry/cohort(/plots) timed for the searches a director runs. The floor is measured in the same run: the
 * smallest query through the same database handle, and the smallest signed-in request through the same app
 * (GET /api/auth/me), so the figures can be read against what the machine does for nothing.
 * Run it alone with `npm run bench -- cohort`.
 */

const WARMUP = 5;
const RUNS = 40;
const HTTP_RUNS = 25;
const PLOT_RUNS = 20;
const GOAL_P95_MS = 100;

/** Reference means for skeletal muscle (activity in nmol/min/mg; ratios follow from the activities). */
const MUSCLE_MEANS: Record<AssayCode, number> = { CI: 37, CII: 30, CIII: 120, CIV: 180, 'CI+III': 45, 'CII+III': 40, CS: 150 };
/**
 * Other tissues are read against their own intervals: the complexes' activities scaled by the first number, citrate
 * synthase's by the second, so the ratios' intervals differ too and the plots meet more than one interval.
 */
const TISSUE_SCALE: Record<SpecimenType, [number, number]> = {
  skeletal_muscle: [1, 1], liver: [0.55, 0.7], heart_muscle: [1.6, 1.4], fibroblasts: [0.35, 0.5], lymphoblasts: [0.3, 0.45], other: [0.8, 0.8],
};
/** The linked assays and the complexes whose deficiency lowers them too. */
const LINKED: Partial<Record<AssayCode, AssayCode[]>> = { 'CI+III': ['CI', 'CIII'], 'CII+III': ['CII', 'CIII'] };
/** Half-width of the invented intervals, as a share of the mean. */
const HALF_WIDTH = 0.4;

/** Findings of a pattern code as the results module writes it ("isolated:CI+raised_cs", "linked:CI+III"). */
function findingsOf(code: string): CohortFinding[] {
  const kinds: Record<string, PatternKind> = {
    normal: 'normal',
    isolated: 'isolated_deficiency',
    combined: 'combined_deficiency',
    linked: 'linked_activity_low',
    raised_cs: 'raised_cs',
    insufficient: 'insufficient_data',
  };
  const out: { kind: PatternKind; complexes: AssayCode[] }[] = [];
  for (const part of code.split('+')) {
    const [kind, complexes] = part.split(':') as [string, string | undefined];
    if (kind in kinds) out.push({ kind: kinds[kind]!, complexes: complexes ? (complexes.split(',') as AssayCode[]) : [] });
    else if (out.length) {
      const last = out[out.length - 1]!.complexes;
      last[last.length - 1] = `${last[last.length - 1]}+${part}` as AssayCode;
    }
  }
  return out;
}

const round = (x: number, places: number) => Number(x.toFixed(places));

/**
 * The printed results of one invented specimen. Each complex has a level (% of normal: about 25% when a
 * deficiency finding names it or a complex it feeds, else about 100%) and the specimen a mitochondrial content
 * (CS, % of the mean: about 175% when CS is raised); an activity is level × content, its ratio to CS the level,
 * its ratio to CII level over CII's level, each with some measurement noise. "Insufficient" specimens lack
 * the linked assays. Intervals are mean ± 40% of the tissue's own means.
 */
function resultsOf(findings: CohortFinding[], type: SpecimenType, noise: () => number): ReportResult[] {
  const low = new Set<AssayCode>(findings.filter((f) => f.kind !== 'normal' && f.kind !== 'raised_cs').flatMap((f) => f.complexes));
  const kinds = new Set(findings.map((f) => f.kind));
  const isLow = (assay: AssayCode) => low.has(assay) || (LINKED[assay] ?? []).some((part) => low.has(part));
  const level = (assay: AssayCode) => (isLow(assay) ? 25 + noise() * 8 : 100) * (1 + noise() * 0.12);
  const levels = Object.fromEntries(Object.keys(MUSCLE_MEANS).map((a) => [a, Math.max(3, level(a as AssayCode))])) as Record<AssayCode, number>;
  const content = Math.max(30, (kinds.has('raised_cs') ? 175 : 100) * (1 + noise() * 0.15));
  const [complexScale, csScale] = TISSUE_SCALE[type];
  const activityMean = (a: AssayCode) => MUSCLE_MEANS[a] * (a === 'CS' ? csScale : complexScale);
  const activity = (a: AssayCode) => (activityMean(a) * (a === 'CS' ? content : (levels[a] * content) / 100)) / 100;
  const skip = kinds.has('insufficient_data') ? new Set<AssayCode>(['CI+III', 'CII+III']) : new Set<AssayCode>();
  return cohortMeasures.filter(({ assay }) => !skip.has(assay)).map(({ assay, measure }) => {
    const raw = measure === 'activity' ? activity(assay) : activity(assay) / activity(measure === 'ratio_cs' ? 'CS' : 'CII');
    const mean = measure === 'activity' ? activityMean(assay) : activityMean(assay) / activityMean(measure === 'ratio_cs' ? 'CS' : 'CII');
    const places = measure === 'activity' ? 1 : 3;
    const value = round(raw, places);
    const pctOfMean = round((value / mean) * 100, 0);
    return {
      assay, assayName: assay, measure, value, unit: measure === 'activity' ? 'nmol/min/mg protein' : 'ratio',
      referenceLower: round(mean * (1 - HALF_WIDTH), places + 1), referenceUpper: round(mean * (1 + HALF_WIDTH), places + 1), referenceMean: round(mean, places + 1),
      intervalLabel: `Invented ${type} interval`, intervalVersion: 1,
      status: value < mean * (1 - HALF_WIDTH) ? 'below' : value > mean * (1 + HALF_WIDTH) ? 'above' : 'within',
      pctOfMean, criterionBand: null, flags: [],
    } satisfies ReportResult;
  });
}

/**
 * Indexes of the tables named are dropped while `fill` runs and built again afterwards from their own
 * definitions (sqlite_master): SQLite builds an index from sorted rows far faster than it grows one row at a
 * time across a table of millions.
 */
async function withoutIndexes(sequelize: Sequelize, tables: string[], fill: () => Promise<void>): Promise<void> {
  const indexes = (await sequelize.query(`SELECT name, sql FROM sqlite_master WHERE type = 'index' AND sql IS NOT NULL AND tbl_name IN (:tables)`, {
    replacements: { tables },
    type: QueryTypes.SELECT,
  })) as { name: string; sql: string }[];
  for (const ix of indexes) await sequelize.query(`DROP INDEX "${ix.name}"`);
  await fill();
  for (const ix of indexes) await sequelize.query(ix.sql);
}

/**
 * Every case of the registry gets a signed report (version 1, final) and its cohort rows and plot cells, written by
 * the same functions signing uses (cohortRowsOf, joinPlotCells), in one transaction of multi-row inserts.
 */
export async function seedCohort(sequelize: Sequelize): Promise<number> {
  const r = rng(20261202);
  const noise = () => Math.sqrt(-2 * Math.log(1 - r())) * Math.cos(2 * Math.PI * r());
  const [{ director }] = (await sequelize.query(`SELECT MIN(id) AS director FROM users WHERE role = 'director'`, { type: QueryTypes.SELECT })) as [{ director: number }];
  const cases = (await sequelize.query(
    `SELECT c.id, c.accession, c."receivedAt", c."specimenTypes", c."patternCode", p.sex, p."dateOfBirth"
       FROM cases c JOIN patients p ON p.id = c."patientId" ORDER BY c.id`,
    { type: QueryTypes.SELECT },
  )) as { id: number; accession: string; receivedAt: string; specimenTypes: string; patternCode: string | null; sex: string; dateOfBirth: string }[];
  // Cases the registry seed left unread (not yet reported) get a pattern drawn as often as a laboratory sees it.
  const codes = ['normal', 'normal', 'normal', 'normal', 'normal', 'isolated:CI', 'isolated:CI', 'isolated:CIV', 'isolated:CIII', 'combined:CI,CIV', 'linked:CI+III', 'raised_cs', 'isolated:CI+raised_cs', 'insufficient'];
  const empty = '0'.repeat(64);
  const reports: unknown[][] = [];
  const members: Record<string, unknown>[] = [];
  const values: Record<string, unknown>[] = [];
  cases.forEach((c, i) => {
    const received = new Date(`${c.receivedAt.slice(0, 10)}T12:00:00Z`);
    const signedAt = new Date(received.getTime() + (5 + Math.floor(r() * 30)) * 86_400_000);
    const reportId = i + 1;
    reports.push([reportId, c.id, 1, 'final', 'Invented benchmark report', 'Benchmark', director, 'Invented director', 'Laboratory director', sqlDate(signedAt), '{}', empty, Buffer.alloc(0), empty, 0, sqlDate(signedAt)]);
    const type = c.specimenTypes.split(',')[1] as SpecimenType;
    const findings = findingsOf(c.patternCode ?? pick(r, codes));
    const rows = cohortRowsOf({
      reportId,
      caseId: c.id,
      accession: c.accession,
      reportVersion: 1,
      reportStatus: 'final',
      sex: c.sex,
      signedOn: signedAt.toISOString().slice(0, 10),
      sections: [{ specimenId: null, label: 'A', type, ageYears: ageInYears(c.dateOfBirth, received), findings, results: resultsOf(findings, type, noise) }],
    });
    for (const row of rows) {
      const memberId = members.length + 1;
      members.push({ id: memberId, ...row.member });
      for (const v of row.values) values.push({ memberId, ...v });
    }
  });
  const insertRows = async (table: string, rows: Record<string, unknown>[], transaction: Transaction) => {
    const columns = Object.keys(rows[0]!);
    await bulkInsert(sequelize, transaction, table, columns, rows.map((row) => columns.map((k) => row[k])));
  };
  await withoutIndexes(sequelize, ['reports', 'cohort_members', 'cohort_values'], () =>
    sequelize.transaction(async (transaction) => {
      // A cache large enough for the whole fill, on the transaction's own connection.
      await sequelize.query('PRAGMA cache_size = -262144', { transaction });
      await bulkInsert(
        sequelize,
        transaction,
        'reports',
        ['id', 'caseId', 'version', 'kind', 'interpretation', 'meaning', 'signedById', 'signerName', 'signerTitle', 'signedAt', 'document', 'documentSha256', 'pdf', 'pdfSha256', 'pdfSizeBytes', 'createdAt'],
        reports,
      );
      // The plot cells as signing keeps them (cohort-plot-cells.ts): every member joins its cells, then is stored.
      await joinPlotCells(sequelize, members, transaction);
      await insertRows('cohort_members', members, transaction);
      await insertRows('cohort_values', values, transaction);
    }),
  );
  await sequelize.query('ANALYZE');
  return cases.length;
}

const qs = (f: CohortFilter) => {
  const sp = new URLSearchParams();
  for (const [k, v] of Object.entries(f)) for (const item of [v].flat()) sp.append(k, String(item));
  return sp.toString();
};

export default async function run(): Promise<BenchResult> {
  const { dir, sequelize } = await openRegistryDatabase('cohort');
  try {
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    await seedRegistry(sequelize);
    const members = await seedCohort(sequelize);
    const seedSeconds = (performance.now() - t0) / 1000;
    // CPU time of the whole process (SQLite works on libuv's threads, counted too): steadier than wall-clock time on a busy machine.
    const seedCpu = process.cpuUsage(cpu0);
    const seedCpuSeconds = (seedCpu.user + seedCpu.system) / 1e6;
    const [{ n: valueCount }] = (await sequelize.query('SELECT COUNT(*) AS n FROM cohort_values', { type: QueryTypes.SELECT })) as [{ n: number }];
    const [{ n: cellCount }] = (await sequelize.query('SELECT COUNT(*) AS n FROM cohort_plot_cells', { type: QueryTypes.SELECT })) as [{ n: number }];

    const year = new Date().getUTCFullYear();
    const views: [string, CohortCriteria, Pick<CohortFilter, 'page' | 'pageSize' | 'sort' | 'dir'>][] = [
      ['every signed case, first page', {}, { pageSize: 25 }],
      ['every signed case, page 2000 of 25', {}, { page: 2000, pageSize: 25 }],
      ['pattern = isolated', { pattern: 'isolated' }, { pageSize: 50 }],
      ['deficient complex = CIV', { complex: 'CIV' }, { pageSize: 50 }],
      ['specimen type = liver', { specimenType: 'liver' }, {}],
      ['under 1 year, female', { ageBand: 'under_1', sex: 'female' }, {}],
      ['one month of report dates', { signedFrom: `${year - 3}-03-01`, signedTo: `${year - 3}-03-31` }, {}],
      ['CI/CS at most 30% of mean', { range: ['CI:ratio_cs:pct::30'] }, {}],
      ['CI/CS ≤ 40% and CIV/CS ≥ 80%', { range: ['CI:ratio_cs:pct::40', 'CIV:ratio_cs:pct:80:'] }, {}],
      ['CS activity 200–400 (value)', { range: ['CS:activity:value:200:400'] }, {}],
      ['sorted by accession', {}, { sort: 'accession', dir: 'asc', pageSize: 50 }],
      [
        'everything at once',
        { pattern: 'isolated', complex: 'CI', specimenType: 'skeletal_muscle', ageBand: '1_to_4', sex: 'female', signedFrom: `${year - 8}-01-01`, signedTo: `${year}-12-31`, range: ['CI:ratio_cs:pct::50'] },
        {},
      ],
    ];

    // Each figure carries the 1-minute load average read right after it was measured: on a shared machine
    // the figures are only as quiet as the machine was.
    const load = () => os.loadavg()[0]!.toFixed(1);
    const rows: BenchResult['rows'] = [];
    const record = (metric: string, t: { p50: number; p95: number }, goal: string, digits = 1, extra = '') =>
      rows.push({
        metric,
        value: `p50 ${t.p50.toFixed(digits)} ms, p95 ${t.p95.toFixed(digits)} ms${extra} (load ${load()})`,
        goal: goal === '—' ? goal : `p95 < ${GOAL_P95_MS} ms`,
        met: goal === '—' || t.p95 < GOAL_P95_MS,
      });
    record('floor: one-row query through the same handle', await time(RUNS, () => sequelize.query('SELECT id FROM cohort_members WHERE id = 1', { type: QueryTypes.SELECT })), '—', 2);
    const sizes: string[] = [];
    for (const [label, criteria, paging] of views) {
      const found = await findCohort(criteria, paging);
      sizes.push(`${label}: ${found.total.toLocaleString('en-GB')}`);
      record(`service: ${label}`, await time(RUNS, () => findCohort(criteria, paging)), 'goal');
    }
    // The plots read the pre-counted plot cells; a filtered cohort adds one pass over the member rows it selects.
    const plotViews: [string, CohortCriteria][] = [['every signed case', {}], ['pattern = isolated', { pattern: 'isolated' }], ['CI/CS ≤ 40% and CIV/CS ≥ 80%', views[8]![1]], ['everything at once', views[11]![1]]];
    for (const [label, criteria] of plotViews) record(`service: plots, ${label}`, await time(PLOT_RUNS, () => cohortPlots(criteria)), 'goal');

    const agent = await signedInAgent(sequelize);
    const floorHttp = await time(HTTP_RUNS, () => agent.get('/api/auth/me'));
    record('floor: GET /api/auth/me (session and JSON, no search)', floorHttp, '—');
    const httpViews: [string, string][] = [
      ...[views[0]!, views[2]!, views[8]!, views[11]!].map(([label, criteria, paging]): [string, string] => [label, `/api/registry/cohort?${qs({ ...criteria, ...paging })}`]),
      ['plots, every signed case', '/api/registry/cohort/plots'],
      ['plots, pattern = isolated', `/api/registry/cohort/plots?${qs(views[2]![1])}`],
      ['plots, everything at once', `/api/registry/cohort/plots?${qs(views[11]![1])}`],
    ];
    for (const [label, url] of httpViews) {
      const check = await agent.get(url);
      if (check.status !== 200) throw new Error(`${url}: ${check.status} ${JSON.stringify(check.body)}`);
      record(`HTTP: ${label}`, await time(HTTP_RUNS, () => agent.get(url)), 'goal', 1, ` (floor p95 ${floorHttp.p95.toFixed(1)} ms)`);
    }

    return {
      title: `Cohort search over ${members.toLocaleString('en-GB')} signed cases (SQLite file, WAL; ${WARMUP} warm-up calls, then ${RUNS} service / ${HTTP_RUNS} HTTP calls per search, ${PLOT_RUNS} per plot)`,
      rows,
      notes:
        `Every one of the ${members.toLocaleString('en-GB')} invented cases carries a signed report, one cohort member and ${Math.round(Number(valueCount) / members)} values ` +
        `(${Number(valueCount).toLocaleString('en-GB')} cohort values); seeding took ${seedSeconds.toFixed(1)} s (${seedCpuSeconds.toFixed(1)} s of CPU). Times include the total count on every call and the values of the page's members. ` +
        `Cohort sizes: ${sizes.join('; ')}. Complexes plotted: ${cohortComplexes.join(', ')}; the plots read ${Number(cellCount).toLocaleString('en-GB')} pre-counted plot cells ` +
        `(migration 0018), and a filtered cohort one pass over the member rows its filter selects. ` +
        `Load is the 1-minute load average just after each figure (2 cores); above 2 other work shared the CPU and inflated the times.`,
    };
  } finally {
    await sequelize.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

await runWhenMain(import.meta.url, run);
