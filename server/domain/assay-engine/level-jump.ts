import type { TracePoint } from '@/schemas/assay';
import { studentTQuantile } from '../reference-stats/distributions';
import { CURVATURE_ALPHA, isolatedReading, traceNoiseVariance, type WindowCheckSettings } from './linearity';

/*
 * A jump in the readings' level inside a window: from one reading on, the trace runs on at the same rate but higher
 * or lower (a bubble that stays on the light path, a knock, a lid closed late). A jump biases the straight line's
 * slope and the curvature tests of linearity.ts cannot see it: each half of a window jumping at its middle is
 * straight and runs at the true rate, so the halves agree, and a quadratic is symmetric about the middle. Measured
 * on 3 December 2026 over 4,536 lines with one jump of 0.01–0.04 (5–20 reading-noise SDs), two or three raised
 * readings: 38 automatic windows were more than 10% off the true rate with no flag (tests/unit/server/assay-engine/
 * level-jump.test.ts).
 *
 * The check: for each place a jump could be (at least three readings either side), the window is fitted as two
 * parallel lines, one before and one after (the common slope is the pooled within-part slope: analysis of
 * covariance, e.g. Zar, Biostatistical Analysis, ch. 18 [from memory]; [common practice] for comparing regression
 * lines). The jump is the gap between the two lines, judged against the trace's reading noise (traceNoiseVariance)
 * with Student's t at α = 0.01 two-sided shared among the places tried (Bonferroni [common practice]); it matters
 * when the straight line's slope differs from the common slope by more than the definition's curvature limit. A
 * jump that is gone once the reading furthest off its neighbours (isolatedReading) is left out was that one reading,
 * a bubble: the outlier check's to flag.
 */

/** Enough to say the noise is known: Student's t then equals the normal quantile to five digits. */
const KNOWN_DF = 1e6;
/** At least this many readings on each side of a jump, for a slope on each side and its error. */
const MIN_SIDE = 3;

export interface LevelJump {
  /** Index in the trace of the first reading after the jump, and its time (s). */
  index: number;
  t: number;
  /** Gap between the line after and the line before, absorbance (positive: the later readings sit higher). */
  jump: number;
  /** The gap in standard errors. */
  z: number;
  /** Common slope of the two parallel lines, per minute: the rate either side of the jump. */
  ratePerMin: number;
  /** Straight-line slope of the window, per minute. */
  linePerMin: number;
  /** (|line| − |rate|) / the larger, %: positive when the straight line runs faster than the rate either side. */
  changePct: number;
}

/** Critical |t| for a given number of places tried (Bonferroni-shared α), computed once per count. */
const criticalFor = new Map<number, number>();
function critical(places: number): number {
  let z = criticalFor.get(places);
  if (z === undefined) {
    z = studentTQuantile(1 - CURVATURE_ALPHA / (2 * places), KNOWN_DF);
    criticalFor.set(places, z);
  }
  return z;
}

type Sums = { n: number; x: number; y: number; xx: number; xy: number };
const zero = (): Sums => ({ n: 0, x: 0, y: 0, xx: 0, xy: 0 });

/**
 * The most significant jump in trace[lo..hi], when it moves the straight line's slope beyond the curvature limit;
 * else null. Needs 2 × MIN_SIDE readings. `againstPerMin`: judge the move against this rate instead of the trace's own
 * (a background or blank trace, whose slope is subtracted from the total's: against the specific rate); `changePct`
 * is then the size of the move as a share of it.
 */
export function levelJump(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  settings: WindowCheckSettings,
  noise: number = traceNoiseVariance(trace, settings.readingNoiseFloor),
  againstPerMin?: number,
): LevelJump | null {
  if (!Number.isFinite(noise) || noise <= 0) return null;
  const every = Array.from({ length: hi - lo + 1 }, (_, i) => lo + i);
  const best = largestJump(trace, every, noise);
  if (!best) return null;
  // A jump that is gone once the reading furthest off its neighbours is left out was that one reading (a bubble).
  const stray = settings.outlierLimitSd === undefined || every.length < 4 ? null : isolatedReading(trace, lo, hi, settings.outlierLimitSd, noise);
  if (stray !== null && !largestJump(trace, every.filter((i) => i !== stray), noise)) return null;
  const scale = againstPerMin === undefined ? Math.max(Math.abs(best.ratePerMin), Math.abs(best.linePerMin)) : Math.abs(againstPerMin);
  const moved = againstPerMin === undefined ? Math.abs(best.linePerMin) - Math.abs(best.ratePerMin) : Math.abs(best.linePerMin - best.ratePerMin);
  const changePct = scale < settings.nearZeroSlopePerMin ? 0 : (100 * moved) / scale;
  return Math.abs(changePct) > settings.curvatureLimitPct ? { ...best, changePct } : null;
}

/** The most significant jump among the readings `kept` (indices into the trace, in order), or null when none is. */
function largestJump(trace: readonly TracePoint[], kept: readonly number[], noise: number): Omit<LevelJump, 'changePct'> | null {
  const m = kept.length;
  if (m < 2 * MIN_SIDE) return null;
  // x in minutes and y from the first reading (for precision); prefix sums over the kept readings.
  const t0 = trace[kept[0]!]!.t;
  const a0 = trace[kept[0]!]!.a;
  const prefix: Sums[] = [zero()];
  for (const i of kept) {
    const p = prefix[prefix.length - 1]!;
    const x = (trace[i]!.t - t0) / 60;
    const y = trace[i]!.a - a0;
    prefix.push({ n: p.n + 1, x: p.x + x, y: p.y + y, xx: p.xx + x * x, xy: p.xy + x * y });
  }
  const part = (from: number, to: number) => {
    const a = prefix[from]!;
    const b = prefix[to]!;
    const n = b.n - a.n;
    const mx = (b.x - a.x) / n;
    const my = (b.y - a.y) / n;
    return { n, mx, my, sxx: b.xx - a.xx - n * mx * mx, sxy: b.xy - a.xy - n * mx * my };
  };
  const all = part(0, m);
  const line = all.sxy / all.sxx;
  const limit = critical(m - 2 * MIN_SIDE + 1);
  let best: Omit<LevelJump, 'changePct'> | null = null;
  for (let k = MIN_SIDE; k <= m - MIN_SIDE; k += 1) {
    const before = part(0, k);
    const after = part(k, m);
    const sxx = before.sxx + after.sxx;
    if (!(sxx > 0)) continue;
    const rate = (before.sxy + after.sxy) / sxx;
    const gap = after.my - before.my - rate * (after.mx - before.mx);
    const z = gap / Math.sqrt(noise * (1 / before.n + 1 / after.n + (after.mx - before.mx) ** 2 / sxx));
    if (Math.abs(z) <= limit || (best && Math.abs(z) <= Math.abs(best.z))) continue;
    const index = kept[k]!;
    best = { index, t: trace[index]!.t, jump: gap, z, ratePerMin: rate, linePerMin: line };
  }
  return best;
}
