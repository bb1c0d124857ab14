import { QueryTypes, type Sequelize } from 'sequelize';
import type { PatternKind } from '@/schemas/assay';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import {
  ageBands,
  cohortComplexes,
  parseRangeToken,
  type CohortComplex,
  type CohortCriteria,
  type CohortFilter,
  type CohortMember,
  type CohortPage,
  type CohortPattern,
  type CohortPlots,
  type CohortValue,
} from '@/schemas/registry';
import { ReportModel } from '../reports/report.model';
import { complexFlagColumns, intervalColumn, measureColumn, patternFlagColumns } from './cohort-rows';

/*
 * Cohort queries over cohort_members / cohort_values (migrations 0016, 0017): every filter and the plots read
 * the member rows alone; cohort_values gives a page's members their values. Portable SQL: double-quoted identifiers,
 * named replacements, LIMIT/OFFSET, FLOOR; nothing SQLite- or PostgreSQL-only.
 */

const db = (): Sequelize => ReportModel.sequelize!;

const PATTERN_KIND: Record<CohortPattern, PatternKind> = {
  normal: 'normal',
  isolated: 'isolated_deficiency',
  combined: 'combined_deficiency',
  linked: 'linked_activity_low',
  raised_cs: 'raised_cs',
  insufficient: 'insufficient_data',
};

type Where = { sql: string; replacements: Record<string, unknown> };

/** The WHERE clause (over cohort_members AS m) that selects the members a filter describes. */
export function cohortWhere(f: CohortCriteria): Where {
  const conds: string[] = [];
  const replacements: Record<string, unknown> = { yes: true };
  if (f.pattern) conds.push(`m."${patternFlagColumns[PATTERN_KIND[f.pattern]]}" = :yes`);
  if (f.complex) conds.push(`m."${complexFlagColumns[f.complex]}" = :yes`);
  if (f.specimenType) {
    conds.push(`m."specimenType" = :specimenType`);
    replacements.specimenType = f.specimenType;
  }
  if (f.sex) {
    conds.push('m.sex = :sex');
    replacements.sex = f.sex;
  }
  if (f.ageBand) {
    const band = ageBands[f.ageBand];
    conds.push('m."ageYears" >= :ageMin');
    replacements.ageMin = band.min;
    if (band.max !== null) {
      conds.push('m."ageYears" <= :ageMax');
      replacements.ageMax = band.max;
    }
  }
  if (f.signedFrom) {
    conds.push('m."signedOn" >= :signedFrom');
    replacements.signedFrom = f.signedFrom;
  }
  if (f.signedTo) {
    conds.push('m."signedOn" <= :signedTo');
    replacements.signedTo = f.signedTo;
  }
  // Each measure's value and % of mean are columns of the member row (migration 0017): no subquery per range.
  (f.range ?? []).forEach((token, i) => {
    const r = parseRangeToken(token);
    const column = `m."${measureColumn(r.assay, r.measure, r.scale)}"`;
    if (r.min !== null) {
      conds.push(`${column} >= :rlo${i}`);
      replacements[`rlo${i}`] = r.min;
    }
    if (r.max !== null) {
      conds.push(`${column} <= :rhi${i}`);
      replacements[`rhi${i}`] = r.max;
    }
  });
  return { sql: conds.length ? `WHERE ${conds.join(' AND ')}` : '', replacements };
}

type MemberRow = {
  id: number;
  reportId: number;
  caseId: number;
  accession: string;
  reportVersion: number;
  reportStatus: string;
  specimenLabel: string;
  specimenType: string;
  sex: string;
  ageYears: number | null;
  signedOn: string;
  patternCode: string | null;
};
type ValueRow = { memberId: number; assay: string; measure: string; value: number | null; pctOfMean: number | null; lower: number | null; upper: number | null };

const MEMBER_COLUMNS = `m.id, m."reportId", m."caseId", m.accession, m."reportVersion", m."reportStatus", m."specimenLabel",
  m."specimenType", m.sex, m."ageYears", m."signedOn", m."patternCode"`;
const SORT_COLUMN = { signedOn: 'm."signedOn"', accession: 'm.accession', ageYears: 'm."ageYears"' } as const;
const num = (v: number | string | null): number | null => (v === null ? null : Number(v));

async function withValues(rows: MemberRow[]): Promise<CohortMember[]> {
  const values = rows.length
    ? ((await db().query(
        `SELECT "memberId", assay, measure, value, "pctOfMean", lower, upper FROM cohort_values WHERE "memberId" IN (:ids) ORDER BY id`,
        { replacements: { ids: rows.map((r) => r.id) }, type: QueryTypes.SELECT },
      )) as ValueRow[])
    : [];
  const byMember = new Map<number, CohortValue[]>();
  for (const v of values) {
    const list = byMember.get(v.memberId) ?? [];
    list.push({
      assay: v.assay as AssayCode,
      measure: v.measure as Measure,
      value: num(v.value),
      pctOfMean: num(v.pctOfMean),
      lower: num(v.lower),
      upper: num(v.upper),
    });
    byMember.set(v.memberId, list);
  }
  return rows.map((r) => ({
    reportId: r.reportId,
    caseId: r.caseId,
    accession: r.accession,
    reportVersion: r.reportVersion,
    reportStatus: r.reportStatus === 'corrected' ? 'corrected' : 'final',
    specimenLabel: r.specimenLabel,
    specimenType: r.specimenType as SpecimenType,
    sex: r.sex as CohortMember['sex'],
    ageYears: r.ageYears,
    signedOn: r.signedOn,
    patternCode: r.patternCode,
    values: byMember.get(r.id) ?? [],
  }));
}

export type CohortPaging = Pick<CohortFilter, 'page' | 'pageSize' | 'sort' | 'dir'>;

/** One page of the cohort a filter describes, newest report date first unless sorted otherwise, with the total. */
export async function findCohort(filters: CohortCriteria, paging: CohortPaging = {}): Promise<CohortPage> {
  const page = paging.page ?? 1;
  const pageSize = paging.pageSize ?? 25;
  const { sql: where, replacements } = cohortWhere(filters);
  const [{ n }] = (await db().query(`SELECT COUNT(*) AS n FROM cohort_members m ${where}`, {
    replacements,
    type: QueryTypes.SELECT,
  })) as [{ n: number | string }];
  const total = Number(n); // PostgreSQL answers a bigint, as a string
  if (total === 0 || (page - 1) * pageSize >= total) return { items: [], total, page, pageSize };
  const sort = paging.sort ?? 'signedOn';
  const dir = (paging.dir ?? (sort === 'signedOn' ? 'desc' : 'asc')) === 'asc' ? 'ASC' : 'DESC';
  const order = `ORDER BY ${SORT_COLUMN[sort]} ${dir}, m.id ${dir}`;
  // The page's ids first (a deep page steps over an index of the sort key, not over whole rows), then their rows.
  const rows = (await db().query(
    `SELECT ${MEMBER_COLUMNS} FROM cohort_members m
      WHERE m.id IN (SELECT m.id FROM cohort_members m ${where} ${order} LIMIT :limit OFFSET :offset) ${order}`,
    { replacements: { ...replacements, limit: pageSize, offset: (page - 1) * pageSize }, type: QueryTypes.SELECT },
  )) as MemberRow[];
  return { items: await withValues(rows), total, page, pageSize };
}

/**
 * Every member of the cohort, oldest member first, in batches of `batchSize` (keyset paging: memory stays flat
 * however large the cohort). For exports; `each` may write the batch out before the next one is read.
 */
export async function eachCohortBatch(
  filters: CohortCriteria,
  batchSize: number,
  each: (members: CohortMember[]) => Promise<void> | void,
): Promise<number> {
  const { sql: where, replacements } = cohortWhere(filters);
  let after = 0;
  let count = 0;
  for (;;) {
    const rows = (await db().query(
      `SELECT ${MEMBER_COLUMNS} FROM cohort_members m ${where ? `${where} AND` : 'WHERE'} m.id > :after ORDER BY m.id LIMIT :limit`,
      { replacements: { ...replacements, after, limit: batchSize }, type: QueryTypes.SELECT },
    )) as MemberRow[];
    if (rows.length === 0) return count;
    await each(await withValues(rows));
    count += rows.length;
    after = rows.at(-1)!.id;
  }
}

/* ---------------------------------------------------------------- plots */

const BINS = 24;

/** A round bin width (1, 2 or 5 × a power of ten) near span / BINS. */
export function niceWidth(span: number): number {
  if (!(span > 0)) return 1;
  const raw = span / BINS;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].find((s) => s * power >= raw)!;
  return step * power;
}

/** Nearest-rank quantile (the smallest value with at least q of the values at or below it) over counted bins. */
function quantileOfBins(bins: { at: number; count: number }[], n: number, q: number): number {
  const rank = Math.max(1, Math.ceil(q * n));
  let seen = 0;
  for (const b of bins) {
    seen += b.count;
    if (seen >= rank) return b.at;
  }
  return bins.at(-1)!.at;
}

type IntervalGroup = { lower: number | null; upper: number | null; mean: number | null; n: number; top: number };

/**
 * What the cohort page draws, over the whole cohort: for each complex, the distribution of its ratio to CS in
 * round bins with the reference interval most members were read against; and the quartiles of that ratio as %
 * of the reference mean, counted in whole percent (the precision a report prints). Two queries over the member
 * rows (migration 0017), whatever the filter: the intervals, then every complex's bins.
 */
export async function cohortPlots(filters: CohortCriteria): Promise<CohortPlots> {
  const { sql: where, replacements } = cohortWhere(filters);
  const ratio = (c: CohortComplex, scale: 'value' | 'pct') => `m."${measureColumn(c, 'ratio_cs', scale)}"`;
  const BOUNDS = ['lower', 'upper', 'mean'] as const;
  const intervals = cohortComplexes.flatMap((c) => BOUNDS.map((b) => `m."${intervalColumn(c, b)}"`));

  // The cohort's size, and for each set of intervals met: each complex's count of values and largest value.
  const groups = (await db().query(
    `SELECT COUNT(*) AS n, ${cohortComplexes.map((c, i) => `COUNT(${ratio(c, 'value')}) AS n${i}, MAX(${ratio(c, 'value')}) AS top${i}`).join(', ')},
            ${intervals.map((col, j) => `${col} AS i${j}`).join(', ')}
       FROM cohort_members m ${where} GROUP BY ${intervals.join(', ')}`,
    { replacements, type: QueryTypes.SELECT },
  )) as Record<string, number | string | null>[];
  const total = groups.reduce((sum, g) => sum + Number(g.n), 0);

  const perAssay = cohortComplexes.map((assay, i) => {
    // One entry per interval of this complex (the groups above also split on the other complexes' intervals).
    const byInterval = new Map<string, IntervalGroup>();
    for (const g of groups) {
      const n = Number(g[`n${i}`]);
      if (n === 0) continue;
      const [lower, upper, mean] = BOUNDS.map((_, b) => num(g[`i${i * 3 + b}`] ?? null));
      const key = JSON.stringify([lower, upper, mean]);
      const seen = byInterval.get(key);
      byInterval.set(key, { lower: lower!, upper: upper!, mean: mean!, n: (seen?.n ?? 0) + n, top: Math.max(seen?.top ?? -Infinity, Number(g[`top${i}`])) });
    }
    const mine = [...byInterval.values()].sort((a, b) => (a.lower ?? -Infinity) - (b.lower ?? -Infinity) || (a.upper ?? -Infinity) - (b.upper ?? -Infinity) || (a.mean ?? -Infinity) - (b.mean ?? -Infinity));
    const n = mine.reduce((sum, g) => sum + g.n, 0);
    const modal = mine.filter((g) => g.lower !== null && g.upper !== null).reduce<IntervalGroup | null>((best, g) => (best === null || g.n > best.n ? g : best), null);
    const top = Math.max(0, ...mine.map((g) => g.top));
    // Up to twice the upper limit, or less when the cohort ends sooner (never below 1.2 × the limit).
    const span = modal ? Math.min(modal.upper! * 2, Math.max(top, modal.upper! * 1.2)) : top;
    return {
      assay,
      n,
      binWidth: niceWidth(span),
      interval: modal ? { lower: modal.lower!, upper: modal.upper!, mean: modal.mean, n: modal.n } : null,
    };
  });

  // Each complex's values in its round bins and its % of mean in whole percent, counted together: the two go
  // hand in hand (a % of mean is the value over one mean), so the groups stay few.
  // The millionth of a bin absorbs floating-point error at bin edges (0.24 / 0.02 = 11.999…).
  const binRows = (await db().query(
    perAssay
      .map((a, i) => {
        const bin = `FLOOR(${ratio(a.assay, 'value')} / :w${i} + 0.000001)`;
        const pct = `FLOOR(${ratio(a.assay, 'pct')})`;
        return `SELECT ${i} AS k, ${bin} AS b, ${pct} AS p, COUNT(*) AS n FROM cohort_members m ${where} GROUP BY ${bin}, ${pct}`;
      })
      .join(' UNION ALL '),
    { replacements: { ...replacements, ...Object.fromEntries(perAssay.map((a, i) => [`w${i}`, a.binWidth])) }, type: QueryTypes.SELECT },
  )) as { k: number | string; b: number | string | null; p: number | string | null; n: number | string }[];
  const binCounts = perAssay.map(() => new Map<number, number>());
  const pctCounts = perAssay.map(() => new Map<number, number>());
  for (const r of binRows) {
    const k = Number(r.k);
    const add = (counts: Map<number, number>, at: number) => counts.set(at, (counts.get(at) ?? 0) + Number(r.n));
    if (r.b !== null) add(binCounts[k]!, Number(r.b));
    if (r.p !== null) add(pctCounts[k]!, Number(r.p));
  }

  return {
    total,
    ratioToCs: perAssay.map((a, k) => {
      // Bins past the last one drawn (a long upper tail) are counted into it, so every member shows.
      const last = Math.max(BINS, Math.ceil((a.interval?.upper ?? 0) / a.binWidth) + 2) - 1;
      const counts = new Map<number, number>();
      for (const [b, n] of binCounts[k]!) {
        const i = Math.min(Math.max(0, b), last);
        counts.set(i, (counts.get(i) ?? 0) + n);
      }
      const bins = Array.from({ length: last + 1 }, (_, i) => ({ from: Number((i * a.binWidth).toPrecision(12)), count: counts.get(i) ?? 0 }));
      return { ...a, bins };
    }),
    pctOfMean: cohortComplexes.map((assay, k) => {
      const bins = [...pctCounts[k]!].map(([at, count]) => ({ at, count })).sort((x, y) => x.at - y.at);
      const n = bins.reduce((s, b) => s + b.count, 0);
      if (n === 0) return { assay, n, min: null, q1: null, median: null, q3: null, max: null };
      return {
        assay,
        n,
        min: bins[0]!.at,
        q1: quantileOfBins(bins, n, 0.25),
        median: quantileOfBins(bins, n, 0.5),
        q3: quantileOfBins(bins, n, 0.75),
        max: bins.at(-1)!.at,
      };
    }),
  };
}
