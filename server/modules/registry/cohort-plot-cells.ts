import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { cohortComplexes, type CohortComplex } from '@/schemas/registry';
import { intervalColumn, measureColumn } from './cohort-columns';

/*
 * The plots' pre-counted cells (migration 0018). A cell is one complex's ratio to CS exactly as members carry it:
 * the reference interval it was read against (lower, upper, mean), the value, and its % of the reference mean in
 * whole percent (what the plots count). cohort_plot_cells holds every cell the registry's members fall in, with
 * how many members are in it (n); each member row lists the ids of its cells in "plotCells" (comma-separated, one
 * per complex it has a ratio for). Both are kept at signing, in the signing transaction: a case's old members
 * leave their cells before its rows are replaced, the new members join theirs.
 * - The plots of every signed case read the cells alone, with their n.
 * - The plots of a filtered cohort count its members' cell ids, read in one pass over the member rows.
 * Values stay exact (JSON numbers round-trip), so the bins cut from the cells at read time hold exactly the
 * values the member rows hold, whatever bin width the cohort needs.
 */

export type PlotCell = {
  complex: CohortComplex;
  lower: number | null;
  upper: number | null;
  mean: number | null;
  value: number | null;
  /** % of the reference mean, rounded down to whole percent. */
  pct: number | null;
};

type Row = Record<string, unknown>;

/** A cell's fields in the order its key lists them. */
export type CellKey = [complex: CohortComplex, lower: number | null, upper: number | null, mean: number | null, value: number | null, pct: number | null];

/** A cell's key (unique in cohort_plot_cells): its fields as a JSON array (a CellKey). */
export const cellKey = (c: PlotCell): string => JSON.stringify([c.complex, c.lower, c.upper, c.mean, c.value, c.pct] satisfies CellKey);

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));
const BOUNDS = ['lower', 'upper', 'mean'] as const;

/** The member columns a member's cells are read from: per complex, its ratio to CS, % of mean and interval. */
export const plotColumns: readonly string[] = cohortComplexes.flatMap((c) => [
  measureColumn(c, 'ratio_cs', 'value'),
  measureColumn(c, 'ratio_cs', 'pct'),
  ...BOUNDS.map((b) => intervalColumn(c, b)),
]);

/** A member row's cells: one per complex with a ratio to CS or a % of mean. */
export function plotCellsOf(member: Row): PlotCell[] {
  return cohortComplexes.flatMap((complex): PlotCell[] => {
    const value = num(member[measureColumn(complex, 'ratio_cs', 'value')]);
    const pct = num(member[measureColumn(complex, 'ratio_cs', 'pct')]);
    if (value === null && pct === null) return [];
    const [lower, upper, mean] = BOUNDS.map((b) => num(member[intervalColumn(complex, b)]));
    return [{ complex, lower: lower!, upper: upper!, mean: mean!, value, pct: pct === null ? null : Math.floor(pct) }];
  });
}

/** The whole numbers of a comma-separated list such as a member's "plotCells", in order ("" and null list none). */
export function eachCellId(list: string | null, each: (id: number) => void): void {
  if (!list) return;
  let id = 0;
  let digits = 0;
  for (let i = 0; i <= list.length; i++) {
    const ch = i < list.length ? list.charCodeAt(i) : 44; // a comma closes the last id
    if (ch >= 48 && ch <= 57) {
      id = id * 10 + (ch - 48);
      digits++;
    } else {
      if (digits > 0) each(id);
      id = 0;
      digits = 0;
    }
  }
}

const CHUNK = 400;
const chunks = <T>(xs: readonly T[]): T[][] => Array.from({ length: Math.ceil(xs.length / CHUNK) }, (_, i) => xs.slice(i * CHUNK, (i + 1) * CHUNK));

/** Before a case's member rows are deleted: its members leave their cells (each cell's n drops; empty cells go). */
export async function leavePlotCells(sequelize: Sequelize, caseId: number, transaction?: Transaction): Promise<void> {
  const rows = (await sequelize.query(`SELECT "plotCells" FROM cohort_members WHERE "caseId" = :caseId`, {
    replacements: { caseId },
    transaction,
    type: QueryTypes.SELECT,
  })) as { plotCells: string | null }[];
  const drops = new Map<number, number>();
  for (const r of rows) eachCellId(r.plotCells, (id) => drops.set(id, (drops.get(id) ?? 0) + 1));
  if (drops.size === 0) return;
  for (const [id, by] of drops) {
    await sequelize.query(`UPDATE cohort_plot_cells SET n = n - :by WHERE id = :id`, { replacements: { id, by }, transaction });
  }
  await sequelize.query(`DELETE FROM cohort_plot_cells WHERE id IN (:ids) AND n <= 0`, { replacements: { ids: [...drops.keys()] }, transaction });
}

/**
 * Before new member rows are inserted: each joins its cells (cells not met before are created) and gets their ids
 * in its "plotCells" (null when it has none). One upsert per chunk of distinct cells, so a bulk fill stays fast.
 */
export async function joinPlotCells(sequelize: Sequelize, members: Row[], transaction?: Transaction): Promise<void> {
  const keysOf = members.map((m) => plotCellsOf(m).map((c) => ({ complex: c.complex, key: cellKey(c) })));
  const joining = new Map<string, { complex: CohortComplex; n: number }>();
  for (const cell of keysOf.flat()) {
    const seen = joining.get(cell.key);
    joining.set(cell.key, { complex: cell.complex, n: (seen?.n ?? 0) + 1 });
  }
  const ids = new Map<string, number>();
  for (const part of chunks([...joining])) {
    const replacements: Record<string, unknown> = {};
    const tuples = part.map(([key, { complex, n }], i) => {
      Object.assign(replacements, { [`k${i}`]: key, [`c${i}`]: complex, [`n${i}`]: n });
      return `(:k${i}, :c${i}, :n${i})`;
    });
    // Portable upsert (SQLite 3.24+, PostgreSQL 9.5+): the keys of one statement are distinct.
    await sequelize.query(
      `INSERT INTO cohort_plot_cells ("key", complex, n) VALUES ${tuples.join(', ')}
         ON CONFLICT ("key") DO UPDATE SET n = cohort_plot_cells.n + excluded.n`,
      { replacements, transaction },
    );
    const found = (await sequelize.query(`SELECT id, "key" FROM cohort_plot_cells WHERE "key" IN (:keys)`, {
      replacements: { keys: part.map(([key]) => key) },
      transaction,
      type: QueryTypes.SELECT,
    })) as { id: number; key: string }[];
    for (const f of found) ids.set(f.key, Number(f.id));
  }
  members.forEach((m, i) => {
    m.plotCells = keysOf[i]!.length ? keysOf[i]!.map((c) => ids.get(c.key)!).join(',') : null;
  });
}

/**
 * Builds the cells afresh from the member rows (migration 0018's backfill): every member joins its cells, a chunk
 * of members per transaction.
 */
export async function rebuildPlotCells(sequelize: Sequelize): Promise<void> {
  await sequelize.query('DELETE FROM cohort_plot_cells');
  let after = 0;
  for (;;) {
    const members = (await sequelize.query(
      `SELECT id, ${plotColumns.map((c) => `"${c}"`).join(', ')} FROM cohort_members WHERE id > :after ORDER BY id LIMIT ${CHUNK}`,
      { replacements: { after }, type: QueryTypes.SELECT },
    )) as Row[];
    if (members.length === 0) return;
    await sequelize.transaction(async (transaction) => {
      await joinPlotCells(sequelize, members, transaction);
      const replacements: Record<string, unknown> = { ids: members.map((m) => m.id) };
      const cases = members.map((m, i) => {
        Object.assign(replacements, { [`id${i}`]: m.id, [`p${i}`]: m.plotCells });
        return `WHEN :id${i} THEN :p${i}`;
      });
      await sequelize.query(`UPDATE cohort_members SET "plotCells" = CASE id ${cases.join(' ')} END WHERE id IN (:ids)`, { replacements, transaction });
    });
    after = Number(members.at(-1)!.id);
  }
}
