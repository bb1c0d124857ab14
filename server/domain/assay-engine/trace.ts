import type { Flag, RateWindow, TracePoint } from '@/schemas/assay';

export type TraceLabel = 'total' | 'background' | 'blank';

/** Short number formatting for flag messages; results themselves are never rounded here. */
export function fmt(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  return Number(x.toPrecision(digits)).toString();
}

/** Readings closer than this are not two readings: slopes over them would not be finite. */
export const MIN_READING_GAP_S = 0.001;

/**
 * Checks that every time and absorbance is finite and that times strictly increase. Pushes at most
 * one flag per problem kind, naming the first offending reading (1-based), and returns whether the
 * trace can be fitted.
 */
export function checkTrace(trace: readonly TracePoint[], label: TraceLabel, flags: Flag[]): boolean {
  let ok = true;
  let prevT = Number.NEGATIVE_INFINITY;
  let reportedOrder = false;
  for (let i = 0; i < trace.length; i += 1) {
    const p = trace[i]!;
    if (!Number.isFinite(p.t) || !Number.isFinite(p.a)) {
      const field = Number.isFinite(p.t) ? 'absorbance' : 'time';
      flags.push({
        code: 'NON_FINITE',
        message: `${label} trace, reading ${i + 1}: the ${field} is not a finite number (${String(Number.isFinite(p.t) ? p.a : p.t)})`,
      });
      return false;
    }
    if (!reportedOrder && i > 0 && !(p.t - prevT >= MIN_READING_GAP_S)) {
      flags.push({
        code: 'TIME_NOT_INCREASING',
        message:
          p.t > prevT
            ? `${label} trace, reading ${i + 1}: time ${fmt(p.t)} s is less than ${MIN_READING_GAP_S * 1000} ms after the previous reading (${fmt(prevT)} s); no photometer reads that fast`
            : `${label} trace, reading ${i + 1}: time ${fmt(p.t)} s is not after the previous reading (${fmt(prevT)} s); times must strictly increase`,
      });
      reportedOrder = true;
      ok = false;
    }
    prevT = p.t;
  }
  return ok;
}

/** First and last index of readings with fromS ≤ t ≤ toS (times already known to increase). */
export function indexRange(
  trace: readonly TracePoint[],
  window: RateWindow,
): { lo: number; hi: number } {
  let lo = 0;
  while (lo < trace.length && trace[lo]!.t < window.fromS) lo += 1;
  let hi = trace.length - 1;
  while (hi >= lo && trace[hi]!.t > window.toS) hi -= 1;
  return { lo, hi };
}

/** Flags the first absorbance in trace[lo..hi] outside [min, max]. */
export function checkLinearRange(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  min: number,
  max: number,
  label: TraceLabel,
  flags: Flag[],
): void {
  for (let i = lo; i <= hi; i += 1) {
    const p = trace[i]!;
    if (p.a < min || p.a > max) {
      flags.push({
        code: 'OUT_OF_LINEAR_RANGE',
        message: `${label} trace, reading ${i + 1} (t = ${fmt(p.t)} s): absorbance ${fmt(p.a)} is outside the linear range ${fmt(min)}–${fmt(max)}`,
      });
      return;
    }
  }
}

/** True when both traces hold exactly the same readings. */
export function sameTrace(a: readonly TracePoint[], b: readonly TracePoint[]): boolean {
  if (a === b) return true;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i += 1) {
    const p = a[i]!;
    const q = b[i]!;
    if (p.t !== q.t || p.a !== q.a) return false;
  }
  return true;
}
