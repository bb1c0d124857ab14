import fs from 'node:fs';
import { performance } from 'node:perf_hooks';
import { QueryTypes, type Sequelize } from 'sequelize';
import type { AssayCode, Measure } from '@/schemas/common';
import { cohortComplexes, type CohortCriteria, type CohortFilter } from '@/schemas/registry';
import { cohortPlots, findCohort } from '../server/modules/registry/cohort.repository';
import { complexFlagColumns, patternFlagColumns } from '../server/modules/registry/cohort-rows';
import { bulkInsert, openRegistryDatabase, pick, rng, runWhenMain, seedRegistry, signedInAgent, sqlDate, time } from './cases-list';
import type { BenchResult } from './types';

/*
 * Cohort search at registry scale: the 100 000 invented cases of the case-list benchmark, every one given a signed
 * report and its cohort rows (one member, 18 values: six complexes' activity and ratios, CS), then findCohort and
 * GET /api/registry/cohort timed for the searches a director runs. The floor is measured in the same run: the
 * smallest query through the same database handle, and the smallest signed-in request through the same app
 * (GET /api/auth/me), so the figures can be read against what the machine does for nothing.
 * Run it alone with `npm run bench -- cohort`.
 */

const WARMUP = 5;
const RUNS = 40;
const HTTP_RUNS = 25;
const GOAL_P95_MS = 100;

/** Reference means of the invented intervals (ratio to CS, ratio to CII, activity); limits at ±40%. */
const MEANS: Record<AssayCode, Partial<Record<Measure, number>>> = {
  CI: { activity: 37, ratio_cs: 0.25, ratio_cii: 1.25 },
  CII: { activity: 30, ratio_cs: 0.2 },
  CIII: { activity: 120, ratio_cs: 0.8, ratio_cii: 4 },
  CIV: { activity: 180, ratio_cs: 1.2, ratio_cii: 6 },
  'CI+III': { activity: 45, ratio_cs: 0.3, ratio_cii: 1.5 },
  'CII+III': { activity: 40, ratio_cs: 0.27, ratio_cii: 1.35 },
  CS: { activity: 150 },
};

/** Findings of a pattern code as the results module writes it ("isolated:CI+raised_cs", "linked:CI+III"). */
function findingsOf(code: string): { kind: keyof typeof patternFlagColumns; complexes: string[] }[] {
  const kinds: Record<string, keyof typeof patternFlagColumns> = {
    normal: 'normal',
    isolated: 'isolated_deficiency',
    combined: 'combined_deficiency',
    linked: 'linked_activity_low',
    raised_cs: 'raised_cs',
    insufficient: 'insufficient_data',
  };
  const out: { kind: keyof typeof patternFlagColumns; complexes: string[] }[] = [];
  for (const part of code.split('+')) {
    const [kind, complexes] = part.split(':') as [string, string | undefined];
    if (kind in kinds) out.push({ kind: kinds[kind]!, complexes: complexes ? complexes.split(',') : [] });
    else if (out.length) out[out.length - 1]!.complexes[out[out.length - 1]!.complexes.length - 1] += `+${part}`;
  }
  return out;
}

async function seedCohort(sequelize: Sequelize): Promise<number> {
  const r = rng(20261202);
  const normal = () => Math.sqrt(-2 * Math.log(1 - r())) * Math.cos(2 * Math.PI * r());
  const [{ director }] = (await sequelize.query(`SELECT MIN(id) AS director FROM users WHERE role = 'director'`, { type: QueryTypes.SELECT })) as [{ director: number }];
  const cases = (await sequelize.query(
    `SELECT c.id, c.accession, c."receivedAt", c."specimenTypes", c."patternCode", p.sex, p."dateOfBirth"
       FROM cases c JOIN patients p ON p.id = c."patientId" ORDER BY c.id`,
    { type: QueryTypes.SELECT },
  )) as { id: number; accession: string; receivedAt: string; specimenTypes: string; patternCode: string | null; sex: string; dateOfBirth: string }[];
  const codes = ['normal', 'normal', 'normal', 'normal', 'isolated:CI', 'isolated:CIV', 'combined:CI,CIV', 'linked:CI+III', 'raised_cs', 'isolated:CI+raised_cs'];
  const now = sqlDate(new Date());
  const empty = '0'.repeat(64);

  await sequelize.transaction(async (transaction) => {
    await bulkInsert(
      sequelize,
      transaction,
      'reports',
      ['caseId', 'version', 'kind', 'interpretation', 'meaning', 'signedById', 'signerName', 'signerTitle', 'signedAt', 'document', 'documentSha256', 'pdf', 'pdfSha256', 'pdfSizeBytes', 'createdAt'],
      cases.map((c) => [c.id, 1, 'final', 'Invented benchmark report', 'Benchmark', director, 'Invented director', 'Laboratory director', now, '{}', empty, Buffer.alloc(0), empty, 0, now]),
    );
    const reports = (await sequelize.query('SELECT id, "caseId" FROM reports ORDER BY id', { type: QueryTypes.SELECT, transaction })) as { id: number; caseId: number }[];
    const reportOf = new Map(reports.map((x) => [x.caseId, x.id]));

    const flagColumns = [...Object.values(patternFlagColumns), ...Object.values(complexFlagColumns)];
    const members: unknown[][] = [];
    const values: unknown[][] = [];
    cases.forEach((c, i) => {
      const received = new Date(`${c.receivedAt.slice(0, 10)}T12:00:00Z`);
      const born = new Date(`${c.dateOfBirth}T00:00:00Z`);
      const age = received >= born ? Math.floor((received.getTime() - born.getTime()) / (365.2425 * 86_400_000)) : null;
      const signedOn = new Date(received.getTime() + (5 + Math.floor(r() * 30)) * 86_400_000).toISOString().slice(0, 10);
      const code = c.patternCode ?? pick(r, codes);
      const findings = findingsOf(code);
      const kinds = new Set(findings.map((f) => f.kind));
      const low = new Set(findings.filter((f) => f.kind !== 'normal' && f.kind !== 'raised_cs').flatMap((f) => f.complexes));
      const memberId = i + 1;
      members.push([
        memberId, reportOf.get(c.id), c.id, c.accession, 1, 'final', 'A', c.specimenTypes.split(',')[1], c.sex, age, signedOn, code,
        ...Object.keys(patternFlagColumns).map((k) => kinds.has(k as keyof typeof patternFlagColumns)),
        ...Object.keys(complexFlagColumns).map((k) => low.has(k)),
      ]);
      for (const [assay, measures] of Object.entries(MEANS)) {
        const pctBase = low.has(assay) ? 25 : assay === 'CS' && kinds.has('raised_cs') ? 180 : 100;
        for (const [measure, mean] of Object.entries(measures)) {
          const pct = Math.max(2, pctBase + normal() * (pctBase === 25 ? 10 : 18));
          values.push([memberId, assay, measure, (mean * pct) / 100, pct, mean * 0.6, mean * 1.4, mean]);
        }
      }
    });
    await bulkInsert(sequelize, transaction, 'cohort_members',
      ['id', 'reportId', 'caseId', 'accession', 'reportVersion', 'reportStatus', 'specimenLabel', 'specimenType', 'sex', 'ageYears', 'signedOn', 'patternCode', ...flagColumns], members);
    await bulkInsert(sequelize, transaction, 'cohort_values', ['memberId', 'assay', 'measure', 'value', 'pctOfMean', 'lower', 'upper', 'mean'], values);
  });
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
    await seedRegistry(sequelize);
    const members = await seedCohort(sequelize);
    const seedSeconds = (performance.now() - t0) / 1000;
    const [{ n: valueCount }] = (await sequelize.query('SELECT COUNT(*) AS n FROM cohort_values', { type: QueryTypes.SELECT })) as [{ n: number }];

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

    const rows: BenchResult['rows'] = [];
    const floorSql = await time(RUNS, () => sequelize.query('SELECT id FROM cohort_members WHERE id = 1', { type: QueryTypes.SELECT }));
    rows.push({ metric: 'floor: one-row query through the same handle', value: `p50 ${floorSql.p50.toFixed(2)} ms, p95 ${floorSql.p95.toFixed(2)} ms`, goal: '—', met: true });
    const sizes: string[] = [];
    for (const [label, criteria, paging] of views) {
      const found = await findCohort(criteria, paging);
      sizes.push(`${label}: ${found.total.toLocaleString('en-GB')}`);
      const { p50, p95 } = await time(RUNS, () => findCohort(criteria, paging));
      rows.push({ metric: `service: ${label}`, value: `p50 ${p50.toFixed(1)} ms, p95 ${p95.toFixed(1)} ms`, goal: `p95 < ${GOAL_P95_MS} ms`, met: p95 < GOAL_P95_MS });
    }

    const agent = await signedInAgent(sequelize);
    const floorHttp = await time(HTTP_RUNS, () => agent.get('/api/auth/me'));
    rows.push({ metric: 'floor: GET /api/auth/me (session and JSON, no search)', value: `p50 ${floorHttp.p50.toFixed(1)} ms, p95 ${floorHttp.p95.toFixed(1)} ms`, goal: '—', met: true });
    for (const [label, criteria, paging] of [views[0]!, views[2]!, views[8]!, views[11]!]) {
      const url = `/api/registry/cohort?${qs({ ...criteria, ...paging })}`;
      const check = await agent.get(url);
      if (check.status !== 200) throw new Error(`${url}: ${check.status} ${JSON.stringify(check.body)}`);
      const { p50, p95 } = await time(HTTP_RUNS, () => agent.get(url));
      rows.push({ metric: `HTTP: ${label}`, value: `p50 ${p50.toFixed(1)} ms, p95 ${p95.toFixed(1)} ms (floor p95 ${floorHttp.p95.toFixed(1)} ms)`, goal: `p95 < ${GOAL_P95_MS} ms`, met: p95 < GOAL_P95_MS });
    }
    // The plots read every value of the cohort (three grouped scans); they load beside the table, not before it.
    for (const [label, criteria] of [['plots, every signed case', {}], ['plots, pattern = isolated', { pattern: 'isolated' }]] as const) {
      // One warm-up and three timed calls: the plots read every value of the cohort.
      const { p50, p95 } = await time(3, () => cohortPlots(criteria), 1);
      rows.push({ metric: `service: ${label}`, value: `p50 ${p50.toFixed(0)} ms, p95 ${p95.toFixed(0)} ms`, goal: 'reported (loads beside the table)', met: true });
    }

    return {
      title: `Cohort search over ${members.toLocaleString('en-GB')} signed cases (SQLite file, WAL; ${WARMUP} warm-up calls, then ${RUNS} service / ${HTTP_RUNS} HTTP calls per search)`,
      rows,
      notes:
        `Every one of the ${members.toLocaleString('en-GB')} invented cases carries a signed report, one cohort member and ${Math.round(Number(valueCount) / members)} values ` +
        `(${Number(valueCount).toLocaleString('en-GB')} cohort values); seeding took ${seedSeconds.toFixed(1)} s. Times include the total count on every call and the values of the page's members. ` +
        `Cohort sizes: ${sizes.join('; ')}. Complexes plotted: ${cohortComplexes.join(', ')}.`,
    };
  } finally {
    await sequelize.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

await runWhenMain(import.meta.url, run);
