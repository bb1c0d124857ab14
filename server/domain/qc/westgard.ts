/**
 * Westgard multirule quality control, after Westgard JO, Barry PL, Hunt MR, Groth T. A multi-rule Shewhart chart
 * for quality control in clinical chemistry. Clin Chem 1981;27:493–501.
 *
 * Pure computation: no I/O. The rules are read exactly as Cristae's contract (POST /api/qc/evaluate) states them,
 * with z = (value − mean) / sd and strict inequalities:
 * - 1-2s  some level of this run |z| > 2 (a warning only);
 * - 1-3s  some level of this run |z| > 3;
 * - 2-2s  two levels of this run both z > 2 or both z < −2, or one level's result here and its previous result
 *         (the last earlier run that has that level) both z > 2 or both z < −2;
 * - R-4s  in this run one level z > 2 and another z < −2;
 * - 4-1s  one level's last four results (this one included) all z > 1 or all z < −1;
 * - 10x   one level's last ten results (this one included) all z > 0 or all z < 0.
 * A rule is reported on every run whose own results complete it: a level the run lacks completes nothing there,
 * and its history simply skips that run. The status is reject when any switched-on rule other than 1-2s fires,
 * warn when only 1-2s fires, and accept otherwise.
 */

import { westgardRules, type QcStatus, type WestgardRuleName } from '@/schemas/qc';

export const WESTGARD_RULES = westgardRules;
export type WestgardRule = WestgardRuleName;

/** The one rule that only warns. */
export const WARNING_RULE: WestgardRule = '1-2s';

export interface WestgardLevel<L extends string | number = string | number> {
  id: L;
  mean: number;
  sd: number;
}

export interface WestgardRun<R = unknown> {
  id: R;
  /** Level id (as a string, the way a JSON object key holds it) → the control value measured in this run. */
  results: Readonly<Record<string, number>>;
}

export interface WestgardViolation<L> {
  rule: WestgardRule;
  /** The levels whose results make the rule fire, in the order the levels were given. */
  levels: L[];
}

export interface WestgardRunResult<R, L> {
  id: R;
  status: QcStatus;
  violations: WestgardViolation<L>[];
}

export interface WestgardOptions {
  /** The rules the laboratory switches on; all of them when left out. */
  rules?: readonly WestgardRule[];
}

/** Thrown for input the evaluation cannot judge; `field` is the dotted path of the offending part. */
export class WestgardInputError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'WestgardInputError';
  }
}

function checkInput(levels: readonly WestgardLevel[], runs: readonly WestgardRun[]): void {
  if (runs.length === 0) throw new WestgardInputError('runs', 'Give at least one run');
  const known = new Set<string>();
  levels.forEach((level, i) => {
    if (!Number.isFinite(level.mean)) throw new WestgardInputError(`levels.${i}.mean`, 'The mean must be a finite number');
    if (!(level.sd > 0) || !Number.isFinite(level.sd)) {
      throw new WestgardInputError(`levels.${i}.sd`, 'The SD must be a finite number greater than 0');
    }
    if (known.has(String(level.id))) throw new WestgardInputError(`levels.${i}.id`, `Level ${level.id} is listed twice`);
    known.add(String(level.id));
  });
  runs.forEach((run, r) => {
    for (const [key, value] of Object.entries(run.results)) {
      if (!known.has(key)) throw new WestgardInputError(`runs.${r}.results.${key}`, `Level ${key} is not among the levels`);
      if (typeof value !== 'number' || !Number.isFinite(value)) {
        throw new WestgardInputError(`runs.${r}.results.${key}`, 'The result must be a finite number');
      }
    }
  });
}

const allAbove = (zs: readonly number[], limit: number) => zs.every((z) => z > limit);
const allBelow = (zs: readonly number[], limit: number) => zs.every((z) => z < limit);

/** Whether the last `n` z-scores of one level (this run's last) lie all on one side beyond ±limit. */
function lastNBeyond(history: readonly number[], n: number, limit: number): boolean {
  if (history.length < n) return false;
  const tail = history.slice(-n);
  return allAbove(tail, limit) || allBelow(tail, -limit);
}

/**
 * Judges every run, oldest first, against the levels' means and SDs. Each run's answer names the rules its own
 * results complete, with the levels involved; earlier runs serve as history for the across-run rules.
 */
export function evaluateWestgard<R, L extends string | number>(
  levels: readonly WestgardLevel<L>[],
  runs: readonly WestgardRun<R>[],
  options: WestgardOptions = {},
): WestgardRunResult<R, L>[] {
  checkInput(levels, runs);
  const switchedOn = new Set<WestgardRule>(options.rules ?? WESTGARD_RULES);
  /** Per level (in the given order): the z-scores of the runs that had it so far. */
  const histories = levels.map(() => [] as number[]);

  return runs.map((run) => {
    const fired = new Map<WestgardRule, Set<number>>();
    const fire = (rule: WestgardRule, levelIndexes: number[]) => {
      if (!switchedOn.has(rule) || levelIndexes.length === 0) return;
      const set = fired.get(rule) ?? new Set<number>();
      levelIndexes.forEach((i) => set.add(i));
      fired.set(rule, set);
    };

    // This run's z-scores, level by level; a level the run lacks is left out.
    const here: { index: number; z: number }[] = [];
    levels.forEach((level, index) => {
      const value = run.results[String(level.id)];
      if (value === undefined) return;
      const z = (value - level.mean) / level.sd;
      here.push({ index, z });
      histories[index]!.push(z);
    });

    const above2 = here.filter((h) => h.z > 2).map((h) => h.index);
    const below2 = here.filter((h) => h.z < -2).map((h) => h.index);

    fire('1-2s', [...above2, ...below2]);
    fire('1-3s', here.filter((h) => Math.abs(h.z) > 3).map((h) => h.index));

    // 2-2s within the run: two (or more) levels beyond 2 SD on the same side.
    if (above2.length >= 2) fire('2-2s', above2);
    if (below2.length >= 2) fire('2-2s', below2);
    // 2-2s across runs: this level's result and its previous one beyond 2 SD on the same side.
    fire(
      '2-2s',
      here.filter((h) => lastNBeyond(histories[h.index]!, 2, 2)).map((h) => h.index),
    );

    if (above2.length > 0 && below2.length > 0) fire('R-4s', [...above2, ...below2]);
    fire('4-1s', here.filter((h) => lastNBeyond(histories[h.index]!, 4, 1)).map((h) => h.index));
    fire('10x', here.filter((h) => lastNBeyond(histories[h.index]!, 10, 0)).map((h) => h.index));

    const violations: WestgardViolation<L>[] = WESTGARD_RULES.filter((rule) => fired.has(rule)).map((rule) => ({
      rule,
      levels: [...fired.get(rule)!].sort((a, b) => a - b).map((i) => levels[i]!.id),
    }));
    return { id: run.id, status: statusOf(violations.map((v) => v.rule)), violations };
  });
}

/** reject when a rule other than 1-2s fired, warn when only 1-2s did, accept when none did. */
export function statusOf(firedRules: readonly WestgardRule[]): QcStatus {
  if (firedRules.some((rule) => rule !== WARNING_RULE)) return 'reject';
  return firedRules.length > 0 ? 'warn' : 'accept';
}
