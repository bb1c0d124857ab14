import type { AssayDefinition, Flag, FittedLine, RateWindow, TracePoint } from '@/schemas/assay';
import { fitTraceRange, longestEarlyWindowEnd } from './regression';
import { checkLinearRange, checkTrace, fmt, indexRange, type TraceLabel } from './trace';

export type RateSettings = Pick<
  AssayDefinition,
  'r2Threshold' | 'minPoints' | 'linearRangeMin' | 'linearRangeMax'
>;

/**
 * How the readings to fit are chosen:
 * - manual: the technologist's window, both ends inclusive;
 * - auto: the longest early window (from the first reading) whose r² reaches the threshold with at
 *   least minPoints readings; the whole trace when none does (and r² is then flagged);
 * - all: every reading (a baseline recorded before the starting substrate).
 */
export type WindowChoice = { kind: 'manual'; window: RateWindow } | { kind: 'auto' } | { kind: 'all' };

export interface FitOptions {
  /** Flag r² under the threshold. Off for background and blank traces, which are flat by design. */
  checkR2: boolean;
}

function windowLabel(choice: WindowChoice): string {
  return choice.kind === 'manual'
    ? `between ${fmt(choice.window.fromS)} and ${fmt(choice.window.toS)} s`
    : 'in the trace';
}

/**
 * Least-squares slope of absorbance against time over the chosen window. Returns null (with a flag
 * saying why) when no slope can be given; a returned line may still carry flags for review.
 */
export function fitTrace(
  trace: readonly TracePoint[],
  label: TraceLabel,
  settings: RateSettings,
  choice: WindowChoice,
  options: FitOptions,
  flags: Flag[],
): FittedLine | null {
  if (!checkTrace(trace, label, flags)) return null;
  const range = selectRange(trace, settings, choice);
  if (!range) {
    flags.push({
      code: 'TOO_FEW_POINTS',
      message: `${label} trace has ${trace.length} reading${trace.length === 1 ? '' : 's'}; at least 3 are needed for a slope`,
    });
    return null;
  }
  const { lo, hi } = range;
  const count = hi - lo + 1;
  if (count < 3) {
    flags.push({
      code: 'TOO_FEW_POINTS',
      message: `${label} trace has ${Math.max(count, 0)} reading${count === 1 ? '' : 's'} ${windowLabel(choice)}; at least 3 are needed for a slope`,
    });
    return null;
  }
  if (count < settings.minPoints) {
    flags.push({
      code: 'TOO_FEW_POINTS',
      message: `${label} trace has ${count} readings ${windowLabel(choice)}, fewer than the laboratory minimum of ${settings.minPoints}`,
    });
  }
  const fit = fitTraceRange(trace, lo, hi);
  const fromS = trace[lo]!.t;
  const toS = trace[hi]!.t;
  if (options.checkR2 && fit.r2 < settings.r2Threshold) {
    flags.push({
      code: 'LOW_R2',
      message: `${label} trace: r² ${fmt(fit.r2)} over ${fmt(fromS)}–${fmt(toS)} s is below the threshold ${fmt(settings.r2Threshold)}`,
    });
  }
  checkLinearRange(trace, lo, hi, settings.linearRangeMin, settings.linearRangeMax, label, flags);
  return {
    fromS,
    toS,
    aAtFrom: fit.intercept + fit.slope * fromS,
    aAtTo: fit.intercept + fit.slope * toS,
    slopePerMin: fit.slope * 60,
    r2: fit.r2,
    residualSd: fit.residualSd,
    points: count,
  };
}

/** Index range for a choice, or null when the trace itself is shorter than 3 readings. */
export function selectRange(
  trace: readonly TracePoint[],
  settings: Pick<RateSettings, 'minPoints' | 'r2Threshold'>,
  choice: WindowChoice,
): { lo: number; hi: number } | null {
  if (trace.length < 3) return null;
  const last = trace.length - 1;
  switch (choice.kind) {
    case 'manual':
      return indexRange(trace, choice.window);
    case 'all':
      return { lo: 0, hi: last };
    case 'auto': {
      const end = longestEarlyWindowEnd(
        trace,
        0,
        last,
        Math.max(3, settings.minPoints),
        settings.r2Threshold,
      );
      return { lo: 0, hi: end < 0 ? last : end };
    }
  }
}
