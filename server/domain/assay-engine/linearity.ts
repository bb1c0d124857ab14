import type { TracePoint } from '@/schemas/assay';
import { studentTQuantile } from '../reference-stats/distributions';
import { fitTraceRange } from './regression';

/*
 * Is a stretch of a kinetic trace straight? r² cannot tell: it compares the signal's range with the noise,
 * so a smooth curve reaches 0.99 easily. Instead the window is fitted both as a straight line and as a
 * quadratic, A = c0 + c1·x + c2·x² with x in minutes from the window's first reading:
 *
 * - c1 is the rate at the window's start; the straight line's slope is (for evenly spaced readings) the rate
 *   at the window's middle. Their relative difference is the error the straight line makes against the
 *   initial rate of that window: `changePct`, negative when the rate falls off across the window (substrate
 *   depletion, a first-order decay), positive when it speeds up (a lag).
 * - the quadratic term is tested against the residual SD with Student's t (two-sided, α = 0.01): the
 *   "extra sum of squares" test of a polynomial term, Draper NR & Smith H, Applied Regression Analysis,
 *   3rd ed. 1998, ch. 12 [from memory; a standard regression test].
 *
 * A window is straight unless the curvature is both significant and larger than the definition's limit:
 * noise alone never condemns a window, and a significant but negligible bend (a few tenths of a percent on a
 * very clean trace) does not either. The approach — widest window whose quadratic term does not matter — is
 * [common practice] in kinetic-assay software; the limit (default 5%) is the laboratory's.
 */

/** Two-sided significance level of the quadratic term. */
export const CURVATURE_ALPHA = 0.01;

const tCritical = new Map<number, number>();
function criticalT(df: number): number {
  let t = tCritical.get(df);
  if (t === undefined) {
    t = studentTQuantile(1 - CURVATURE_ALPHA / 2, df);
    tCritical.set(df, t);
  }
  return t;
}

/** Running sums of x, x², x³, x⁴, y, xy, x²y, y² over a window, x and y shifted to the window's start. */
export class WindowSums {
  n = 0;
  private sx = 0;
  private sx2 = 0;
  private sx3 = 0;
  private sx4 = 0;
  private sy = 0;
  private sxy = 0;
  private sx2y = 0;
  private syy = 0;

  constructor(
    private readonly t0: number,
    private readonly a0: number,
  ) {}

  add(p: TracePoint, sign: 1 | -1 = 1): void {
    const x = (p.t - this.t0) / 60;
    const y = p.a - this.a0;
    const x2 = x * x;
    this.n += sign;
    this.sx += sign * x;
    this.sx2 += sign * x2;
    this.sx3 += sign * x2 * x;
    this.sx4 += sign * x2 * x2;
    this.sy += sign * y;
    this.sxy += sign * x * y;
    this.sx2y += sign * x2 * y;
    this.syy += sign * y * y;
  }

  /** Takes a reading added before back out (the window shrinks from its end). */
  remove(p: TracePoint): void {
    this.add(p, -1);
  }

  /** The straight-line and quadratic view of the readings added so far (needs n ≥ 3). */
  shape(nearZeroSlopePerMin: number): WindowShape {
    const n = this.n;
    const sxx = this.sx2 - (this.sx * this.sx) / n;
    const sxz = this.sx3 - (this.sx * this.sx2) / n;
    const szz = this.sx4 - (this.sx2 * this.sx2) / n;
    const sxy = this.sxy - (this.sx * this.sy) / n;
    const szy = this.sx2y - (this.sx2 * this.sy) / n;
    const syy = this.syy - (this.sy * this.sy) / n;

    const slope = sxy / sxx;
    const sseLine = Math.max(0, syy - slope * sxy);
    const slopeSe = n > 2 ? Math.sqrt(sseLine / (n - 2) / sxx) : Number.POSITIVE_INFINITY;
    const r2 = syy > 0 ? Math.max(0, 1 - sseLine / syy) : 0;

    const det = sxx * szz - sxz * sxz;
    let startSlope = slope;
    let curvatureT = 0;
    let significant = false;
    if (det > 1e-12 * sxx * szz) {
      const c1 = (sxy * szz - sxz * szy) / det;
      const c2 = (sxx * szy - sxz * sxy) / det;
      const sseQuad = Math.max(0, syy - c1 * sxy - c2 * szy);
      const df = n - 3;
      const se = df > 0 ? Math.sqrt((sseQuad / df) * (sxx / det)) : 0;
      startSlope = c1;
      curvatureT = se > 0 ? c2 / se : c2 === 0 ? 0 : Math.sign(c2) * Number.POSITIVE_INFINITY;
      significant = df < 1 || Math.abs(curvatureT) > criticalT(df);
    }
    // Relative to the faster of the two rates, so a flat start (a lag) or a flat end gives a finite figure.
    const scale = Math.max(Math.abs(startSlope), Math.abs(slope));
    const changePct =
      scale < nearZeroSlopePerMin || scale === 0 ? 0 : (100 * (Math.abs(slope) - Math.abs(startSlope))) / scale;
    return { n, slopePerMin: slope, slopeSePerMin: slopeSe, startSlopePerMin: startSlope, changePct, curvatureT, significant, r2 };
  }
}

export interface WindowShape {
  n: number;
  /** Least-squares straight-line slope, absorbance units per minute. */
  slopePerMin: number;
  /** Its standard error. */
  slopeSePerMin: number;
  /** Rate at the window's first reading from the quadratic fit. */
  startSlopePerMin: number;
  /** (|line slope| − |start rate|) / the larger of the two, %: negative = slows down, positive = speeds up. */
  changePct: number;
  /** t statistic of the quadratic term. */
  curvatureT: number;
  significant: boolean;
  r2: number;
}

export interface LinearitySettings {
  minPoints: number;
  curvatureLimitPct: number;
  lagMaxS: number;
  nearZeroSlopePerMin: number;
}

export function isStraight(shape: WindowShape, curvatureLimitPct: number): boolean {
  return !(shape.significant && Math.abs(shape.changePct) > curvatureLimitPct);
}

/** The shape of trace[lo..hi] (inclusive; at least 3 readings). */
export function windowShape(trace: readonly TracePoint[], lo: number, hi: number, nearZeroSlopePerMin: number): WindowShape {
  const first = trace[lo]!;
  const sums = new WindowSums(first.t, first.a);
  for (let i = lo; i <= hi; i += 1) sums.add(trace[i]!);
  return sums.shape(nearZeroSlopePerMin);
}

export interface FoundWindow {
  kind: 'found';
  lo: number;
  hi: number;
  shape: WindowShape;
  /** Set when the window starts after the first reading because the opening readings ran slower. */
  lag: { readings: number; toS: number; openingSlopePerMin: number; slowerPct: number } | null;
}

export interface NoWindow {
  kind: 'none';
  /** The shortest window from the first reading, to say how curved the trace is. */
  lo: number;
  hi: number;
  shape: WindowShape;
}

/**
 * The automatic rate window:
 * 1. for every start within `lagMaxS` of the first reading (leaving at least `minPoints` readings), the
 *    longest straight window from that start (searched from the longest down);
 * 2. of those, the earliest start whose rate is within noise of the fastest one (4·√2 standard errors of
 *    the fastest window's slope, and at least 0.5%): a slower opening stretch is a lag and is stepped over, while on a straight trace
 *    every start gives the same rate and the first reading is kept;
 * 3. no straight window at all → `none`: the caller refuses to give a rate rather than fit a curve.
 */
export function findLinearWindow(trace: readonly TracePoint[], settings: LinearitySettings): FoundWindow | NoWindow {
  const last = trace.length - 1;
  const minPoints = Math.max(3, settings.minPoints);
  const t0 = trace[0]!.t;
  const candidates: { lo: number; hi: number; shape: WindowShape }[] = [];
  let firstShortest: { lo: number; hi: number; shape: WindowShape } | null = null;

  for (let lo = 0; lo + minPoints - 1 <= last && trace[lo]!.t - t0 <= settings.lagMaxS; lo += 1) {
    // Longest first: all readings from lo, then shrink from the end until the window is straight.
    const sums = new WindowSums(trace[lo]!.t, trace[lo]!.a);
    for (let i = lo; i <= last; i += 1) sums.add(trace[i]!);
    for (let hi = last; hi - lo + 1 >= minPoints; hi -= 1) {
      const shape = sums.shape(settings.nearZeroSlopePerMin);
      if (isStraight(shape, settings.curvatureLimitPct)) {
        candidates.push({ lo, hi, shape });
        break;
      }
      if (lo === 0 && hi - lo + 1 === minPoints) firstShortest = { lo, hi, shape };
      sums.remove(trace[hi]!);
    }
  }

  if (candidates.length === 0) {
    const fallback = firstShortest ?? { lo: 0, hi: last, shape: windowShape(trace, 0, last, settings.nearZeroSlopePerMin) };
    return { kind: 'none', ...fallback };
  }

  let fastest = candidates[0]!;
  for (const c of candidates) if (Math.abs(c.shape.slopePerMin) > Math.abs(fastest.shape.slopePerMin)) fastest = c;
  const top = Math.abs(fastest.shape.slopePerMin);
  // The allowance is the fastest window's own noise (as if the two were independent), not the other
  // window's: a window straddling a lag has a large residual SD from the kink itself, which must not excuse it.
  const allowance = Math.max(4 * Math.SQRT2 * finiteOr0(fastest.shape.slopeSePerMin), 0.005 * top);
  const chosen = candidates.find((c) => Math.abs(c.shape.slopePerMin) >= top - allowance) ?? fastest;

  let lag: FoundWindow['lag'] = null;
  if (chosen.lo > 0) {
    // The opening readings' own rate, from a line through them and the window's first reading.
    const opening = fitTraceRange(trace, 0, chosen.lo).slope * 60;
    lag = {
      readings: chosen.lo,
      toS: trace[chosen.lo]!.t,
      openingSlopePerMin: opening,
      slowerPct: chosen.shape.slopePerMin !== 0 ? (100 * (Math.abs(chosen.shape.slopePerMin) - Math.abs(opening))) / Math.abs(chosen.shape.slopePerMin) : 0,
    };
  }
  return { kind: 'found', lo: chosen.lo, hi: chosen.hi, shape: chosen.shape, lag };
}

function finiteOr0(x: number): number {
  return Number.isFinite(x) ? x : 0;
}

export interface OutlierReading {
  index: number;
  t: number;
  a: number;
  /** Distance from the line fitted without it, in residual SDs (the SD floored at the noise floor). */
  sds: number;
  deviation: number;
}

/**
 * The reading furthest from the line fitted to the others, when that distance exceeds `limitSd` residual
 * SDs of the others' fit (an externally studentised residual, Belsley, Kuh & Welsch 1980 [from memory];
 * [common practice] for single-point outliers). The SD is floored at the instrument's reading noise so a
 * noise-free trace does not turn rounding into outliers. Needs 5 readings or more.
 */
export function worstOutlier(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  limitSd: number,
  noiseFloor: number,
): OutlierReading | null {
  const n = hi - lo + 1;
  if (n < 5) return null;
  let st = 0;
  let sa = 0;
  let stt = 0;
  let sta = 0;
  let saa = 0;
  const tRef = trace[lo]!.t;
  const aRef = trace[lo]!.a;
  for (let i = lo; i <= hi; i += 1) {
    const x = trace[i]!.t - tRef;
    const y = trace[i]!.a - aRef;
    st += x;
    sa += y;
    stt += x * x;
    sta += x * y;
    saa += y * y;
  }
  let worst: OutlierReading | null = null;
  for (let i = lo; i <= hi; i += 1) {
    const x = trace[i]!.t - tRef;
    const y = trace[i]!.a - aRef;
    const m = n - 1;
    const mx = (st - x) / m;
    const my = (sa - y) / m;
    const sxx = stt - x * x - m * mx * mx;
    const sxy = sta - x * y - m * mx * my;
    const syy = saa - y * y - m * my * my;
    if (!(sxx > 0)) continue;
    const slope = sxy / sxx;
    const sse = Math.max(0, syy - slope * sxy);
    const sd = Math.max(Math.sqrt(sse / (m - 2)), noiseFloor);
    const deviation = y - (my + slope * (x - mx));
    const sds = Math.abs(deviation) / sd;
    if (sds > limitSd && (!worst || sds > worst.sds)) {
      worst = { index: i, t: trace[i]!.t, a: trace[i]!.a, sds, deviation };
    }
  }
  return worst;
}
