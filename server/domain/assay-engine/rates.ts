import type { AssayDefinition, Flag, FittedLine, RateWindow, TracePoint } from '@/schemas/assay';
import { levelJump, type LevelJump } from './level-jump';
import { curvedPart, findLinearWindow, traceNoiseVariance, worstOutlier } from './linearity';
import { fitTraceRange } from './regression';
import { checkLinearRange, checkTrace, fmt, indexRange, type TraceLabel } from './trace';

export type RateSettings = Pick<
  AssayDefinition,
  | 'r2Threshold'
  | 'minPoints'
  | 'linearRangeMin'
  | 'linearRangeMax'
  | 'curvatureLimitPct'
  | 'lagMaxS'
  | 'outlierLimitSd'
  | 'readingNoiseFloor'
  | 'nearZeroSlopePerMin'
>;

/**
 * How the readings to fit are chosen:
 * - manual: the technologist's window, both ends inclusive; checked for curvature and outliers, and
 *   flagged (never refused) when it fails;
 * - auto: the longest straight window, stepping over a slower opening stretch (a lag); none straight →
 *   no slope, with NO_LINEAR_WINDOW (see linearity.ts). Never the whole trace as a fallback;
 * - all: every reading (a baseline recorded before the starting substrate; a first-order log trace).
 */
export type WindowChoice = { kind: 'manual'; window: RateWindow } | { kind: 'auto' } | { kind: 'all' };

export interface FitOptions {
  /**
   * The trace the rate is read from (the total): its r² and curvature are judged. Off for background and
   * blank traces, which are flat or small by design and share the total's window.
   */
  checkR2: boolean;
  /** Look for a single reading far off the line. Off for log-transformed (first-order) traces. */
  checkOutliers?: boolean;
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
  if (trace.length < 3) {
    flags.push({
      code: 'TOO_FEW_POINTS',
      message: `${label} trace has ${trace.length} reading${trace.length === 1 ? '' : 's'}; at least 3 are needed for a slope`,
    });
    return null;
  }
  const range = selectRange(trace, settings, choice, options.checkR2, label, flags);
  if (!range) return null;
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
      message: `${label} trace: r² ${fmt(fit.r2)} over ${fmt(fromS)}–${fmt(toS)} s is below the threshold ${fmt(settings.r2Threshold)}: the readings scatter widely around the line`,
      values: { r2: fit.r2, threshold: settings.r2Threshold },
    });
  }
  // A chosen window is checked and flagged; an automatic one found by the search is straight by construction
  // (so passes), and a trace shorter than the minimum, fitted whole, is checked like a chosen window.
  // The trace's reading noise, the yardstick of both window checks (computed once).
  const noise = options.checkR2 ? traceNoiseVariance(trace, settings.readingNoiseFloor) : Number.NaN;
  const curved = options.checkR2 && count >= 4 && flagCurvature(trace, lo, hi, label, settings, noise, flags);
  // A bent window is already flagged; on a straight one, a jump in level is what the curvature tests cannot see.
  if (options.checkR2 && options.checkOutliers !== false && !curved) flagLevelJump(trace, lo, hi, label, settings, noise, flags);
  if (options.checkOutliers !== false) {
    const outlier = worstOutlier(trace, lo, hi, settings.outlierLimitSd, settings.readingNoiseFloor);
    if (outlier) {
      flags.push({
        code: 'OUTLIER_READING',
        message: `${label} trace, reading ${outlier.index + 1} (t = ${fmt(outlier.t)} s): absorbance ${fmt(outlier.a)} lies ${fmt(Math.abs(outlier.deviation), 2)} ${outlier.deviation > 0 ? 'above' : 'below'} the line through the other readings, ${fmt(outlier.sds, 2)} times their scatter (limit ${fmt(settings.outlierLimitSd, 2)}): look for a bubble or a knock, and move the window or repeat the reading`,
        values: { reading: outlier.index + 1, t: outlier.t, sds: outlier.sds, limitSd: settings.outlierLimitSd },
      });
    }
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

/** Flags the window when its readings jump to another level part-way (level-jump.ts). */
function flagLevelJump(trace: readonly TracePoint[], lo: number, hi: number, label: TraceLabel, settings: RateSettings, noise: number, flags: Flag[]): void {
  const jump = levelJump(trace, lo, hi, settings, noise);
  if (!jump) return;
  flags.push({
    code: 'LEVEL_JUMP',
    message: `${label} trace between ${fmt(trace[lo]!.t)} and ${fmt(trace[hi]!.t)} s: from ${fmt(jump.t)} s on the readings sit ${fmt(Math.abs(jump.jump), 2)} ${jump.jump > 0 ? 'higher' : 'lower'} than the line of those before (a jump: a bubble that stays, a knock, a lid), so the straight line's rate is ${fmt(Math.abs(jump.changePct), 3)}% ${jump.changePct > 0 ? 'faster' : 'slower'} than the rate on either side, ${fmt(jump.ratePerMin, 3)} per minute (limit ${fmt(settings.curvatureLimitPct, 3)}%); set the window on one side of the jump, or repeat the reading`,
    values: { t: jump.t, jump: jump.jump, changePct: jump.changePct, ratePerMin: jump.ratePerMin, limitPct: settings.curvatureLimitPct },
  });
}

/**
 * Flags a jump in level inside the window of a background or blank trace (level-jump.ts): its slope is subtracted
 * from the total's, so the jump is judged by how much it moves the specific rate, against the curvature limit.
 */
export function flagJumpAgainst(
  trace: readonly TracePoint[],
  fitted: FittedLine,
  label: 'background' | 'blank',
  specificPerMin: number,
  settings: RateSettings,
  flags: Flag[],
): void {
  const { lo, hi } = indexRange(trace, { fromS: fitted.fromS, toS: fitted.toS });
  const jump = levelJump(trace, lo, hi, settings, undefined, specificPerMin);
  if (!jump) return;
  flags.push({
    code: 'LEVEL_JUMP',
    message: `${label} trace between ${fmt(fitted.fromS)} and ${fmt(fitted.toS)} s: from ${fmt(jump.t)} s on the readings sit ${fmt(Math.abs(jump.jump), 2)} ${jump.jump > 0 ? 'higher' : 'lower'} than the line of those before (a jump: a bubble that stays, a knock, a lid), which moves the ${label} slope by ${fmt(Math.abs(jump.linePerMin - jump.ratePerMin), 3)} per minute, ${fmt(jump.changePct, 3)}% of the specific rate (limit ${fmt(settings.curvatureLimitPct, 3)}%); set the window on one side of the jump, or repeat the ${label} reading`,
    values: { t: jump.t, jump: jump.jump, changePct: jump.changePct, ratePerMin: jump.ratePerMin, limitPct: settings.curvatureLimitPct },
  });
}

/** Flags the window when it is not straight (as a whole, or its second half against its first); true when flagged. */
function flagCurvature(trace: readonly TracePoint[], lo: number, hi: number, label: TraceLabel, settings: RateSettings, noise: number, flags: Flag[]): boolean {
  const shape = curvedPart(trace, lo, hi, settings, noise);
  if (!shape) return false;
  const change = shape.changePct;
  const fromS = trace[lo]!.t;
  const toS = trace[hi]!.t;
  const leftOut = shape.leftOut
    ? `; judged without reading ${shape.leftOut.index + 1} (t = ${fmt(shape.leftOut.t)} s), which lies far off its neighbours and hid the bend`
    : '';
  flags.push({
    code: 'CURVATURE',
    message:
      (change < 0
        ? `${label} trace between ${fmt(fromS)} and ${fmt(toS)} s is curved: the straight line's rate is ${fmt(-change, 3)}% below the rate at the window's start (limit ${fmt(settings.curvatureLimitPct, 3)}%), so the activity is underestimated; a shorter, earlier window or a diluted sample gives the initial rate`
        : `${label} trace between ${fmt(fromS)} and ${fmt(toS)} s speeds up: the rate at the window's start is ${fmt(change, 3)}% slower than the straight line's (limit ${fmt(settings.curvatureLimitPct, 3)}%), as after a lag; start the window later`) + leftOut,
    values: { changePct: change, limitPct: settings.curvatureLimitPct },
  });
  return true;
}

/** Index range for a choice; null (with a flag) when the automatic choice finds no straight window. */
export function selectRange(
  trace: readonly TracePoint[],
  settings: RateSettings,
  choice: WindowChoice,
  judged: boolean,
  label: TraceLabel,
  flags: Flag[],
): { lo: number; hi: number } | null {
  const last = trace.length - 1;
  switch (choice.kind) {
    case 'manual':
      return indexRange(trace, choice.window);
    case 'all':
      return { lo: 0, hi: last };
    case 'auto': {
      // Too short for the laboratory's minimum: the whole trace, flagged by the caller for its length.
      if (trace.length < Math.max(3, settings.minPoints)) return { lo: 0, hi: last };
      const found = findLinearWindow(trace, settings);
      if (found.kind === 'none' && found.fasterAfter) {
        flags.push({
          code: 'NO_LINEAR_WINDOW',
          message: `${label} trace: every straight stretch (the first ${fmt(trace[found.lo]!.t)}–${fmt(trace[found.hi]!.t)} s) is followed by readings that run faster, as at the end of a lag or where the readings jump to another level, so no initial rate can be read. No activity is given: read for longer, or set a window by hand (it will be flagged)`,
          values: { fromS: trace[found.lo]!.t, toS: trace[found.hi]!.t },
        });
        return null;
      }
      if (found.kind === 'none') {
        const s = found.shape;
        flags.push({
          code: 'NO_LINEAR_WINDOW',
          message: `${label} trace: no stretch of ${s.n} or more readings is straight, so no initial rate can be read — across ${found.lo === 0 ? 'the first' : 'the'} ${s.n} readings (${fmt(trace[found.lo]!.t)}–${fmt(trace[found.hi]!.t)} s) the rate already ${s.changePct < 0 ? 'falls' : 'rises'} by ${fmt(Math.abs(s.changePct), 3)}% (limit ${fmt(settings.curvatureLimitPct, 3)}%). No activity is given: dilute the sample or read more often, or set a window by hand (it will be flagged)`,
          values: { changePct: s.changePct, limitPct: settings.curvatureLimitPct, fromS: trace[found.lo]!.t, toS: trace[found.hi]!.t },
        });
        return null;
      }
      // A jump in level inside the window (level-jump.ts) would bias its rate: the window keeps to one side of it. A
      // "lag" whose readings ran at the window's own rate, at another level, was a jump at the window's start.
      const side = judged ? (sideOfJump(trace, found.lo, found.hi, settings) ?? (found.lag ? jumpForLag(trace, found.lo, found.hi, settings) : null)) : null;
      const keepsStart = side === null || (side.region.lo === found.lo && side.lo === found.lo);
      if (found.lag && judged && keepsStart) {
        flags.push({
          code: 'LAG_EXCLUDED',
          message: `${label} trace: the first ${found.lag.readings} reading${found.lag.readings === 1 ? '' : 's'} (before ${fmt(found.lag.toS)} s) were left out of the rate: the reaction ran ${fmt(found.lag.slowerPct, 3)}% slower there than afterwards (a lag)`,
          values: { readings: found.lag.readings, toS: found.lag.toS, slowerPct: found.lag.slowerPct },
        });
      }
      if (found.avoided && judged && keepsStart) {
        const v = found.avoided;
        flags.push({
          code: 'STRAY_READING_AVOIDED',
          message: `${label} trace: the window starts at ${fmt(v.toS)} s rather than ${fmt(v.fromS)} s, leaving out ${v.readings} reading${v.readings === 1 ? '' : 's'} that ran at the same rate, because reading ${v.index + 1} (t = ${fmt(v.t)} s) lies far off its neighbours (a bubble or a knock) and the longer window from ${fmt(v.toS)} s does not hold it`,
          values: { reading: v.index + 1, t: v.t, readings: v.readings, fromS: v.fromS, toS: v.toS },
        });
      }
      if (side) {
        const j = side.jump;
        const [fromS, toS] = [trace[side.lo]!.t, trace[side.hi]!.t];
        flags.push({
          code: 'JUMP_AVOIDED',
          message: `${label} trace: from ${fmt(j.t)} s on the readings sit ${fmt(Math.abs(j.jump), 2)} ${j.jump > 0 ? 'higher' : 'lower'} (a jump: a bubble that stays, a knock, a lid), which would make the straight line over ${fmt(trace[side.region.lo]!.t)}–${fmt(trace[side.region.hi]!.t)} s run ${fmt(Math.abs(j.changePct), 3)}% ${j.changePct > 0 ? 'faster' : 'slower'} than the rate on either side; the window is kept to ${fmt(fromS)}–${fmt(toS)} s, ${side.lo >= j.index ? 'after' : 'before'} the jump, the longer straight stretch on one side of it`,
          values: { t: j.t, jump: j.jump, changePct: j.changePct, fromS, toS },
        });
      }
      return side ? { lo: side.lo, hi: side.hi } : { lo: found.lo, hi: found.hi };
    }
  }
}

/**
 * When the automatic window trace[lo..hi] holds a jump in level (levelJump), the longer straight stretch on one side
 * of it: the window's own readings before the jump, or the longest straight window from the jump on (which may
 * reach past `hi`). Of equal lengths, the earlier. Null when there is no jump, or neither side has enough readings.
 */
function sideOfJump(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  settings: RateSettings,
  jump: LevelJump | null = levelJump(trace, lo, hi, settings),
): JumpSide | null {
  if (!jump) return null;
  const sides: { lo: number; hi: number }[] = [];
  if (jump.index - lo >= Math.max(3, settings.minPoints) && curvedPart(trace, lo, jump.index - 1, settings) === null) {
    sides.push({ lo, hi: jump.index - 1 });
  }
  const after = findLinearWindow(trace.slice(jump.index), { ...settings, lagMaxS: 0 });
  if (after.kind === 'found') sides.push({ lo: jump.index + after.lo, hi: jump.index + after.hi });
  if (sides.length === 0) return null;
  const longer = sides.reduce((a, b) => (b.hi - b.lo > a.hi - a.lo ? b : a));
  return { ...longer, jump, region: { lo, hi } };
}

/** A side of a jump kept by sideOfJump, the jump, and the readings it was found in. */
type JumpSide = { lo: number; hi: number; jump: LevelJump; region: { lo: number; hi: number } };

/**
 * When the automatic window trace[lo..hi] starts after a "lag", whether the readings before it were a jump instead:
 * over the trace's first reading to `hi`, a jump at the window's first reading (or next to it) with the readings on
 * each side running at the same rate (within the curvature limit, as two halves of a window must). A real lag runs
 * slower than the reaction, so its two sides differ; a jump up on a falling line made the readings before it look
 * slower to the window search. Then the longer side is kept, as for a jump inside a window.
 */
function jumpForLag(trace: readonly TracePoint[], lo: number, hi: number, settings: RateSettings): JumpSide | null {
  const jump = levelJump(trace, 0, hi, settings);
  if (!jump || Math.abs(jump.index - lo) > 1 || jump.index < Math.max(3, settings.minPoints)) return null;
  const before = Math.abs(fitTraceRange(trace, 0, jump.index - 1).slope);
  const after = Math.abs(fitTraceRange(trace, jump.index, hi).slope);
  const scale = Math.max(before, after);
  if (scale > 0 && (100 * Math.abs(after - before)) / scale > settings.curvatureLimitPct) return null;
  return sideOfJump(trace, 0, hi, settings, jump);
}
