import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { cohortComplexes, type CohortComplex } from '@/schemas/registry';
import { intervalColumn, measureColumn } from './cohort-columns';

/*
 * The plots' pre-counted cells (migration 0018). A cell is one complex's ratio to CS exactly as members carry it:
 * the reference interval it was read against (lower, upper, mean), the value, and its % of the reference mean in
 * whole percent (what the plots count). cohort_plot_cells holds every cell the registry's members fell in, with
 * how many members are in it now (n); each member row lists the ids of its cells in "plotCells" (comma-separated, one
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

/** Adds to the counts of cells by id (one statement per chunk). */
async function addToCells(sequelize: Sequelize, deltas: ReadonlyMap<number, number>, transaction?: Transaction): Promise<void> {
  for (const part of chunks([...deltas])) {
    const replacements: Record<string, unknown> = { ids: part.map(([id]) => id) };
    const cases = part.map(([id, by], i) => {
      Object.assign(replacements, { [`i${i}`]: id, [`b${i}`]: by });
      return `WHEN :i${i} THEN :b${i}`;
    });
    await sequelize.query(`UPDATE cohort_plot_cells SET n = n + CASE id ${cases.join(' ')} END WHERE id IN (:ids)`, { replacements, transaction });
  }
}

/**
 * Before a case's member rows are deleted: its members leave their cells (each cell's n drops). A cell left empty
 * stays, at n = 0: ids and keys never change once written, which lets a filtered cohort read its cells' keys after
 * its members' ids (cohort.repository.ts).
 */
export async function leavePlotCells(sequelize: Sequelize, caseId: number, transaction?: Transaction): Promise<void> {
  const rows = (await sequelize.query(`SELECT "plotCells" FROM cohort_members WHERE "caseId" = :caseId`, {
    replacements: { caseId },
    transaction,
    type: QueryTypes.SELECT,
  })) as { plotCells: string | null }[];
  const drops = new Map<number, number>();
  for (const r of rows) eachCellId(r.plotCells, (id) => drops.set(id, (drops.get(id) ?? 0) - 1));
  await addToCells(sequelize, drops, transaction);
}

/**
 * Before new member rows are inserted: each joins its cells (cells not met before are created) and gets their ids
 * in its "plotCells" (null when it has none). A few statements per chunk of distinct cells, so a bulk fill stays
 * fast. Writes are one at a time (writeTransaction; the migration and the benchmark alone), so a key looked up and
 * not found is still new when it is inserted; no upsert, which would spend an id on every key already there.
 */
export async function joinPlotCells(sequelize: Sequelize, members: Row[], transaction?: Transaction): Promise<void> {
  const keysOf = members.map((m) => plotCellsOf(m).map((c) => ({ complex: c.complex, key: cellKey(c) })));
  const joining = new Map<string, { complex: CohortComplex; n: number }>();
  for (const cell of keysOf.flat()) {
    const seen = joining.get(cell.key);
    joining.set(cell.key, { complex: cell.complex, n: (seen?.n ?? 0) + 1 });
  }
  const ids = new Map<string, number>();
  const idsOf = async (keys: string[]) => {
    const found = (await sequelize.query(`SELECT id, "key" FROM cohort_plot_cells WHERE "key" IN (:keys)`, {
      replacements: { keys },
      transaction,
      type: QueryTypes.SELECT,
    })) as { id: number; key: string }[];
    for (const f of found) ids.set(f.key, Number(f.id));
  };
  for (const part of chunks([...joining.keys()])) {
    await idsOf(part);
    await addToCells(sequelize, new Map(part.filter((key) => ids.has(key)).map((key) => [ids.get(key)!, joining.get(key)!.n])), transaction);
    const fresh = part.filter((key) => !ids.has(key));
    if (fresh.length === 0) continue;
    const replacements: Record<string, unknown> = {};
    const tuples = fresh.map((key, i) => {
      Object.assign(replacements, { [`k${i}`]: key, [`c${i}`]: joining.get(key)!.complex, [`n${i}`]: joining.get(key)!.n });
      return `(:k${i}, :c${i}, :n${i})`;
    });
    await sequelize.query(`INSERT INTO cohort_plot_cells ("key", complex, n) VALUES ${tuples.join(', ')}`, { replacements, transaction });
    await idsOf(fresh);
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
