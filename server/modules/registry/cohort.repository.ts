import { QueryTypes, type Sequelize } from 'sequelize';
import type { PatternKind } from '@/schemas/assay';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import {
  ageBands,
  cohortComplexes,
  parseRangeToken,
  type CohortCriteria,
  type CohortFilter,
  type CohortMember,
  type CohortPage,
  type CohortPattern,
  type CohortPlots,
  type CohortValue,
} from '@/schemas/registry';
import { ReportModel } from '../reports/report.model';
import { eachCellId, type CellKey } from './cohort-plot-cells';
import { complexFlagColumns, measureColumn, patternFlagColumns } from './cohort-rows';

/*
 * Cohort queries over cohort_members / cohort_values (migrations 0016, 0017): every filter reads the member rows
 * alone; cohort_values gives a page's members their values; the plots read the plot cells (migration 0018). Portable SQL: double-quoted identifiers,
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
 * Plot cells as lists aggregated in one pass (so in the same order): the keys as one JSON array, and `also` (ids
 * or counts) comma-separated. Plain aggregates cost far less than one text built per cell.
 */
const cellLists = (also: 'id' | 'n', where: string) =>
  `SELECT '[' || string_agg("key", ',') || ']' AS keys, string_agg(CAST(${also} AS TEXT), ',') AS list FROM cohort_plot_cells ${where}`;
/** A filtered cohort in so few cells reads those cells alone, by id; in more, every cell (one pass is cheaper). */
const FEW_CELLS = 2000;

/**
 * What the cohort page draws, over the whole cohort: for each complex, the distribution of its ratio to CS in
 * round bins with the reference interval most members were read against; and the quartiles of that ratio as %
 * of the reference mean, counted in whole percent (the precision a report prints). Read from the plot cells
 * (migration 0018), with no sort of the cohort whatever its size:
 * - every signed case: the cells' own counts, in the same statement as the total (one snapshot);
 * - a filtered cohort: one pass over the member rows its filter selects, their cell ids gathered as one text
 *   (string_agg: SQLite 3.44+, PostgreSQL) and counted here, then the keys of those cells. A cell's key never
 *   changes and a cell is never deleted, so reading the keys in a second statement cannot miss or mislabel one.
 */
export async function cohortPlots(filters: CohortCriteria): Promise<CohortPlots> {
  const { sql: where, replacements } = cohortWhere(filters);
  type Lists = { keys: string | null; list: string | null };
  if (!where) {
    const [row] = (await db().query(`SELECT * FROM (SELECT COUNT(*) AS total FROM cohort_members) AS m, (${cellLists('n', 'WHERE n > 0')}) AS c`, {
      type: QueryTypes.SELECT,
    })) as [Lists & { total: number | string }];
    const counts: number[] = [];
    eachCellId(row.list, (n) => counts.push(n));
    return plotsOfCells(Number(row.total), JSON.parse(row.keys ?? '[]') as CellKey[], counts); // PostgreSQL's COUNT is a bigint, as a string
  }
  const [cohort] = (await db().query(`SELECT COUNT(*) AS total, string_agg(m."plotCells", ',') AS members FROM cohort_members m ${where}`, {
    replacements,
    type: QueryTypes.SELECT,
  })) as [{ total: number | string; members: string | null }];
  // Each member listed its cells' ids: count them by id (in a dense array, grown as larger ids come).
  let byId = new Float64Array(1024);
  eachCellId(cohort.members, (id) => {
    if (id >= byId.length) {
      const grown = new Float64Array(Math.max(id + 1, byId.length * 2));
      grown.set(byId);
      byId = grown;
    }
    byId[id]! += 1;
  });
  const present: number[] = [];
  for (let id = 0; id < byId.length; id++) if (byId[id]! > 0) present.push(id);
  const [cells] = present.length
    ? ((await db().query(cellLists('id', present.length <= FEW_CELLS ? 'WHERE id IN (:present)' : ''), {
        replacements: { present },
        type: QueryTypes.SELECT,
      })) as [Lists])
    : [{ keys: null, list: null }];
  const counts: number[] = [];
  eachCellId(cells.list, (id) => counts.push(byId[id]!));
  return plotsOfCells(Number(cohort.total), JSON.parse(cells.keys ?? '[]') as CellKey[], counts);
}

const COMPLEX_INDEX = new Map<string, number>(cohortComplexes.map((c, i) => [c, i]));

/** Get-or-create in a map. */
function entry<K, V>(map: Map<K, V>, key: K, create: () => V): V {
  let v = map.get(key);
  if (v === undefined) map.set(key, (v = create()));
  return v;
}

/** The plots of a cohort of `total` members whose ratios to CS fall in these cells, counts[i] members in keys[i]. */
function plotsOfCells(total: number, keys: readonly CellKey[], counts: ArrayLike<number>): CohortPlots {
  // First pass: per complex, per interval (lower → upper → mean), the values counted and the largest.
  const intervals = cohortComplexes.map(() => new Map<number | null, Map<number | null, Map<number | null, IntervalGroup>>>());
  for (let i = 0; i < keys.length; i++) {
    const n = counts[i]!;
    if (!n) continue; // a cell none of this cohort's members is in
    const [complex, lower, upper, mean, value] = keys[i]!;
    if (value === null) continue;
    const byUpper = entry(intervals[COMPLEX_INDEX.get(complex)!]!, lower, () => new Map());
    const group = entry(entry(byUpper, upper, () => new Map()), mean, () => ({ lower, upper, mean, n: 0, top: -Infinity }));
    group.n += n;
    group.top = Math.max(group.top, value);
  }
  const perAssay = cohortComplexes.map((assay, k) => {
    const mine = [...intervals[k]!.values()].flatMap((byUpper) => [...byUpper.values()].flatMap((byMean) => [...byMean.values()]));
    mine.sort((a, b) => (a.lower ?? -Infinity) - (b.lower ?? -Infinity) || (a.upper ?? -Infinity) - (b.upper ?? -Infinity) || (a.mean ?? -Infinity) - (b.mean ?? -Infinity));
    const n = mine.reduce((sum, g) => sum + g.n, 0);
    const modal = mine.filter((g) => g.lower !== null && g.upper !== null).reduce<IntervalGroup | null>((best, g) => (best === null || g.n > best.n ? g : best), null);
    const top = Math.max(0, ...mine.map((g) => g.top));
    // Up to twice the upper limit, or less when the cohort ends sooner (never below 1.2 × the limit).
    const span = modal ? Math.min(modal.upper! * 2, Math.max(top, modal.upper! * 1.2)) : top;
    const binWidth = niceWidth(span);
    // Bins past the last one drawn (a long upper tail) are counted into it, so every member shows.
    const last = Math.max(BINS, Math.ceil((modal?.upper ?? 0) / binWidth) + 2) - 1;
    return { assay, n, binWidth, last, interval: modal ? { lower: modal.lower!, upper: modal.upper!, mean: modal.mean, n: modal.n } : null };
  });

  // Second pass: each value into its bin of its complex's width, each % of mean counted.
  const bins = perAssay.map((a) => new Array<number>(a.last + 1).fill(0));
  const pcts = cohortComplexes.map(() => new Map<number, number>());
  for (let i = 0; i < keys.length; i++) {
    const n = counts[i]!;
    if (!n) continue;
    const [complex, , , , value, pct] = keys[i]!;
    const k = COMPLEX_INDEX.get(complex)!;
    if (value !== null) {
      const { binWidth, last } = perAssay[k]!;
      // The millionth of a bin absorbs floating-point error at bin edges (0.24 / 0.02 = 11.999…).
      bins[k]![Math.min(Math.max(0, Math.floor(value / binWidth + 0.000001)), last)]! += n;
    }
    if (pct !== null) pcts[k]!.set(pct, (pcts[k]!.get(pct) ?? 0) + n);
  }

  return {
    total,
    ratioToCs: perAssay.map(({ last: _last, ...a }, k) => ({
      ...a,
      bins: bins[k]!.map((count, i) => ({ from: Number((i * a.binWidth).toPrecision(12)), count })),
    })),
    pctOfMean: cohortComplexes.map((assay, k) => {
      const counted = [...pcts[k]!].map(([at, count]) => ({ at, count })).sort((x, y) => x.at - y.at);
      const n = counted.reduce((s, b) => s + b.count, 0);
      if (n === 0) return { assay, n, min: null, q1: null, median: null, q3: null, max: null };
      return {
        assay,
        n,
        min: counted[0]!.at,
        q1: quantileOfBins(counted, n, 0.25),
        median: quantileOfBins(counted, n, 0.5),
        q3: quantileOfBins(counted, n, 0.75),
        max: counted.at(-1)!.at,
      };
    }),
  };
}
