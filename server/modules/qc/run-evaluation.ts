import type { Transaction } from 'sequelize';
import { evaluateWestgard, type WestgardRule } from '../../domain/qc/westgard';
import type { WestgardRuleName } from '@/schemas/qc';
import { getLabQcRules } from './qc-rules.service';
import { approvedTargets, listControlResults, type ControlHistoryEntry } from './qc.repository';

/** How many earlier results per level the longest rule (10x) needs besides this run's own. */
const HISTORY_DEPTH = 9;

export interface RunControlInput {
  /** The run being judged; null before it is stored. Its own earlier evaluation never counts as history. */
  runId: number | null;
  startedAt: Date;
  /** One result per control material and assay (the mean of the material's replicate wells). */
  results: { controlMaterialId: number; assayCode: string; value: number }[];
}

export interface RunControlEvaluation {
  /** reject when any assay rejects, else warn when any warns, else accept; none when no result had an approved target. */
  status: 'accept' | 'warn' | 'reject' | 'none';
  violations: { rule: WestgardRuleName; assayCode: string; controlMaterialIds: number[] }[];
  /** Per input result, in input order: the approved target it was judged against and its z; null when none. */
  perResult: { controlMaterialId: number; assayCode: string; controlTargetId: number | null; z: number | null }[];
}

/**
 * Judges one run's control results with the Westgard rules the laboratory switches on (server/domain/qc/westgard.ts).
 *
 * Per assay, the levels are the control materials with an approved target for that assay. The history is the stored
 * control results of those materials from runs that started earlier (by run start, ties by run id, never the run
 * itself), each as the z it was judged with when its run was evaluated; results stored without a target (before one
 * was approved, e.g. the first 20 that establish it) are not history. Assays combine: reject if any rejects.
 * Read-only: the caller stores `perResult` on its control_results rows and the status on the run. Pass the caller's
 * transaction when it is writing the run, so the history it reads is the one it writes after.
 */
export async function evaluateRunControls(input: RunControlInput, transaction?: Transaction): Promise<RunControlEvaluation> {
  const { rules } = await getLabQcRules(transaction);
  const perResult: RunControlEvaluation['perResult'] = input.results.map((r) => ({
    controlMaterialId: r.controlMaterialId,
    assayCode: r.assayCode,
    controlTargetId: null,
    z: null,
  }));
  const violations: RunControlEvaluation['violations'] = [];
  const statuses: string[] = [];

  for (const assayCode of [...new Set(input.results.map((r) => r.assayCode))]) {
    const here = input.results.filter((r) => r.assayCode === assayCode);
    const targets = new Map(
      (await approvedTargets(assayCode, undefined, transaction)).map((t) => [t.controlMaterialId, t] as const),
    );
    const judged = here.filter((r) => targets.has(r.controlMaterialId));
    if (judged.length === 0) continue;

    // Earlier runs, merged by run: each level's last few z-scores.
    const earlier = new Map<number, { startedAt: Date; results: Record<string, number> }>();
    for (const materialId of targets.keys()) {
      const history = await listControlResults(
        materialId,
        assayCode,
        { before: { startedAt: input.startedAt, runId: input.runId }, limit: HISTORY_DEPTH, newestFirst: true },
        transaction,
      );
      for (const h of history.filter((e): e is ControlHistoryEntry & { z: number } => e.z !== null)) {
        const run = earlier.get(h.runId) ?? { startedAt: h.startedAt, results: {} };
        run.results[String(materialId)] = h.z;
        earlier.set(h.runId, run);
      }
    }
    const runs = [...earlier.entries()]
      .sort(([idA, a], [idB, b]) => a.startedAt.getTime() - b.startedAt.getTime() || idA - idB)
      .map(([id, run]) => ({ id: id as number | 'this', results: run.results }));

    // This run's results as z against the approved targets; every level is then judged on z (mean 0, SD 1).
    const thisRun: Record<string, number> = {};
    for (const r of judged) {
      const target = targets.get(r.controlMaterialId)!;
      const z = (r.value - target.mean) / target.sd;
      thisRun[String(r.controlMaterialId)] = z;
      const slot = perResult.find((p) => p.controlMaterialId === r.controlMaterialId && p.assayCode === assayCode)!;
      slot.controlTargetId = target.id;
      slot.z = z;
    }
    runs.push({ id: 'this', results: thisRun });
    const levels = [...targets.keys()].map((id) => ({ id, mean: 0, sd: 1 }));
    const verdict = evaluateWestgard(levels, runs, { rules: rules as WestgardRule[] }).at(-1)!;
    statuses.push(verdict.status);
    for (const v of verdict.violations) violations.push({ rule: v.rule, assayCode, controlMaterialIds: v.levels });
  }

  const status = statuses.includes('reject')
    ? 'reject'
    : statuses.includes('warn')
      ? 'warn'
      : statuses.length > 0
        ? 'accept'
        : 'none';
  return { status, violations, perResult };
}

/** Every stored control result of one material and assay in run order (oldest first), with its run's status. */
export async function controlHistory(controlMaterialId: number, assayCode: string, transaction?: Transaction): Promise<ControlHistoryEntry[]> {
  return listControlResults(controlMaterialId, assayCode, {}, transaction);
}
