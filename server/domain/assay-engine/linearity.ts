import type { TracePoint } from '@/schemas/assay';
import { studentTQuantile } from '../reference-stats/distributions';

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

  /** The straight line alone: slope per minute, residual sum of squares and Sxx (needs n ≥ 2). */
  line(): { slope: number; sse: number; sxx: number; n: number } {
    const sxx = this.sx2 - (this.sx * this.sx) / this.n;
    const sxy = this.sxy - (this.sx * this.sy) / this.n;
    const syy = this.syy - (this.sy * this.sy) / this.n;
    const slope = sxy / sxx;
    return { slope, sse: Math.max(0, syy - slope * sxy), sxx, n: this.n };
  }

  /**
   * The straight-line and quadratic view of the readings added so far (needs n ≥ 3). The quadratic term is judged
   * against its own residuals, or against the trace's reading noise (`noiseVariance`, traceNoiseVariance) when that
   * is smaller: the residuals also hold whatever a quadratic cannot follow (a kink), which must not excuse it.
   */
  shape(nearZeroSlopePerMin: number, noiseVariance?: number): WindowShape {
    const n = this.n;
    const sxx = this.sx2 - (this.sx * this.sx) / n;
    const sxz = this.sx3 - (this.sx * this.sx2) / n;
    const szz = this.sx4 - (this.sx2 * this.sx2) / n;
    const sxy = this.sxy - (this.sx * this.sy) / n;
    const szy = this.sx2y - (this.sx2 * this.sy) / n;
    const syy = this.syy - (this.sy * this.sy) / n;

    const slope = sxy / sxx;
    const sseLine = Math.max(0, syy - slope * sxy);
    const lineVariance = n > 2 ? sseLine / (n - 2) : Number.POSITIVE_INFINITY;
    const slopeSe = Math.sqrt((noiseVariance !== undefined && Number.isFinite(noiseVariance) ? Math.min(lineVariance, noiseVariance) : lineVariance) / sxx);
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
      const own = df > 0 ? sseQuad / df : 0;
      const variance = noiseVariance !== undefined && Number.isFinite(noiseVariance) ? Math.min(own, noiseVariance) : own;
      const se = Math.sqrt(variance * (sxx / det));
      startSlope = c1;
      curvatureT = se > 0 ? c2 / se : c2 === 0 ? 0 : Math.sign(c2) * Number.POSITIVE_INFINITY;
      significant = df < 1 || Math.abs(curvatureT) > criticalT(df);
    }
    // Relative to the faster of the two rates, so a flat start (a lag) or a flat end gives a finite figure; taken
    // in the straight line's direction, so a start that runs the other way (a flat lag into a fall) speeds up.
    const scale = Math.max(Math.abs(startSlope), Math.abs(slope));
    const direction = Math.sign(slope) || Math.sign(startSlope);
    const changePct = scale < nearZeroSlopePerMin || scale === 0 ? 0 : (100 * direction * (slope - startSlope)) / scale;
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
  /** Set when the window is bent only once this reading (far off its neighbours) is left out (curvedPart). */
  leftOut?: { index: number; t: number };
}

export interface LinearitySettings {
  minPoints: number;
  curvatureLimitPct: number;
  lagMaxS: number;
  nearZeroSlopePerMin: number;
  /** The instrument's reading noise, absorbance SD: the least noise a trace is taken to have (0 when not given). */
  readingNoiseFloor?: number;
  /** A reading this many noise SDs off its neighbours is also left out when judging a window (not given: none is). */
  outlierLimitSd?: number;
}

/** What the checks of one window read from the settings (curvedPart, and level-jump.ts's levelJump). */
export type WindowCheckSettings = Pick<LinearitySettings, 'curvatureLimitPct' | 'nearZeroSlopePerMin' | 'readingNoiseFloor' | 'outlierLimitSd'>;

export function isStraight(shape: WindowShape, curvatureLimitPct: number): boolean {
  return !(shape.significant && Math.abs(shape.changePct) > curvatureLimitPct);
}

/** The shape of trace[lo..hi] (inclusive; at least 3 readings). */
export function windowShape(trace: readonly TracePoint[], lo: number, hi: number, nearZeroSlopePerMin: number, noiseVariance?: number): WindowShape {
  const first = trace[lo]!;
  const sums = new WindowSums(first.t, first.a);
  for (let i = lo; i <= hi; i += 1) sums.add(trace[i]!);
  return sums.shape(nearZeroSlopePerMin, noiseVariance);
}

/** Fewest readings for the halves test (three in each half, for a slope and its error) and for the thirds test. */
const MIN_FOR_HALVES = 6;
const MIN_FOR_THIRDS = 8;

/** Slope (per minute), residual sum of squares, Sxx and count of a straight line through trace[lo..hi], without reading `skip` when given. */
function lineSums(trace: readonly TracePoint[], lo: number, hi: number, skip: number | null = null): ReturnType<WindowSums['line']> {
  const sums = new WindowSums(trace[lo]!.t, trace[lo]!.a);
  for (let i = lo; i <= hi; i += 1) if (i !== skip) sums.add(trace[i]!);
  return sums.line();
}

/** Straight-line slopes (per minute) of consecutive parts of trace[lo..hi], their pooled residual variance and its degrees of freedom. */
function partSlopes(trace: readonly TracePoint[], lo: number, hi: number, parts: number): { slopes: number[]; sxx: number[]; variance: number; df: number } {
  const n = hi - lo + 1;
  const slopes: number[] = [];
  const sxx: number[] = [];
  let sse = 0;
  for (let p = 0; p < parts; p += 1) {
    const from = lo + Math.floor((p * n) / parts);
    const to = lo + Math.floor(((p + 1) * n) / parts) - 1;
    const line = lineSums(trace, from, to);
    slopes.push(line.slope);
    sxx.push(line.sxx);
    sse += line.sse;
  }
  return { slopes, sxx, variance: sse / (n - 2 * parts), df: n - 2 * parts };
}

/**
 * The reading noise of a whole trace as a variance (NaN with fewer than 3 readings), from each interior reading's distance to the straight line
 * through its two neighbours (a pseudo-residual, Gasser, Sroka & Jennen-Steinmetz, Biometrika 1986 [from memory]),
 * scaled by its own variance factor 1 + w₁² + w₂², and the median of their sizes (× 1.4826, the normal
 * consistency factor of the median absolute deviation [common practice]). A smooth bend or a single kink barely
 * moves it, unlike the residuals of a line or a quadratic through a bent window, which take the bend for noise.
 * It is the instrument's noise on this trace, so every window of the trace is judged against the same figure, and
 * never less than the instrument's own reading noise (`floor`, the definition's readingNoiseFloor): a reading is
 * never more exact than that, even where a trace looks noise-free.
 */
export function traceNoiseVariance(trace: readonly TracePoint[], floor = 0): number {
  return noiseVarianceOf(pseudoResiduals(trace), floor);
}

/** traceNoiseVariance from the trace's pseudoResiduals. */
function noiseVarianceOf(pseudo: readonly number[], floor: number): number {
  const sizes = pseudo.slice(1, -1);
  if (sizes.length === 0) return Number.NaN;
  sizes.sort((x, y) => x - y);
  const m = sizes.length;
  const median = m % 2 === 1 ? sizes[(m - 1) / 2]! : (sizes[m / 2 - 1]! + sizes[m / 2]!) / 2;
  return Math.max(1.4826 * median, floor) ** 2;
}

/** Each reading's pseudo-residual size (see traceNoiseVariance), in absorbance; 0 for the first and last reading, which have one neighbour. */
function pseudoResiduals(trace: readonly TracePoint[]): number[] {
  const sizes = trace.map(() => 0);
  for (let i = 1; i < trace.length - 1; i += 1) {
    const before = trace[i - 1]!;
    const at = trace[i]!;
    const after = trace[i + 1]!;
    const span = after.t - before.t;
    const w1 = (after.t - at.t) / span;
    const w2 = (at.t - before.t) / span;
    sizes[i] = Math.abs(at.a - (w1 * before.a + w2 * after.a)) / Math.sqrt(1 + w1 * w1 + w2 * w2);
  }
  return sizes;
}

/**
 * The reading of trace[lo..hi] that stands furthest off the line through its two neighbours, when that distance
 * exceeds `limitSd` times the trace's reading noise (a bubble, a knock): null when none does. Judged against its
 * neighbours rather than a line through the window, so a bend in the window does not hide it.
 */
export function isolatedReading(trace: readonly TracePoint[], lo: number, hi: number, limitSd: number, noiseVariance: number): number | null {
  return worstIn(spikeSizes(pseudoResiduals(trace)), lo, hi, limitSd * Math.sqrt(noiseVariance));
}

/**
 * pseudoResiduals kept only where a reading stands further off than both its neighbours (0 elsewhere): one reading
 * lifted by d is d/√1.5 off its neighbours' line, and each neighbour, measured against it, about half that; only
 * the lifted reading is the odd one out [derived by hand from the pseudo-residual's weights ½, ½].
 */
function spikeSizes(sizes: readonly number[]): number[] {
  return sizes.map((size, i) => (size > (sizes[i - 1] ?? 0) && size >= (sizes[i + 1] ?? 0) ? size : 0));
}

/** The index in lo..hi of the largest of `sizes` above `limit`, or null. */
function worstIn(sizes: readonly number[], lo: number, hi: number, limit: number): number | null {
  let worst: number | null = null;
  for (let i = lo; i <= hi; i += 1) {
    if (sizes[i]! > limit && (worst === null || sizes[i]! > sizes[worst]!)) worst = i;
  }
  return worst;
}

/** Student's t of a contrast Σ wᵢ·slopeᵢ of part slopes: significant at α = 0.01 two-sided (see CURVATURE_ALPHA). */
function contrastSignificant(value: number, weights: number[], parts: ReturnType<typeof partSlopes>, noise: number): boolean {
  const se = Math.sqrt(Math.min(parts.variance, noise) * weights.reduce((sum, w, i) => sum + (w * w) / parts.sxx[i]!, 0));
  const t = se > 0 ? Math.abs(value) / se : value === 0 ? 0 : Number.POSITIVE_INFINITY;
  return t > criticalT(parts.df);
}

const relativePct = (difference: number, scale: number, nearZero: number) => (scale < nearZero || scale === 0 ? 0 : (100 * difference) / scale);

/**
 * Whether trace[lo..hi] bends beyond the limit: the whole window against a quadratic; then, from 6 readings, its
 * second half against its first; then, from 9 readings, its middle third against the mean of the outer thirds.
 * One quadratic cannot see an S: a window straddling a lag and a first-order decay runs slow, fast, then slower
 * again, fits a quadratic badly (so its quadratic term is not significant) and keeps an r² of 0.99, while its
 * straight line was a third below the initial rate. The part slopes see it. The part tests are the textbook
 * comparison of regression slopes by Student's t (e.g. Zar, Biostatistical Analysis, ch. 18 [from memory]) at the
 * α of the quadratic test, against the parts' pooled residual variance or the trace's reading noise
 * (traceNoiseVariance), whichever is smaller: the parts' residuals alone would count the bend itself as noise; comparing the early part of a window with the rest is
 * the [common practice] linearity check of kinetic readings (domain.md § 5a). They keep the quadratic's limit:
 * on a parabola the halves' slopes (the rates at ¼ and ¾ of the window) differ by exactly the start-to-middle
 * change the quadratic test measures, and the middle third's slope is exactly the mean of the outer thirds'
 * [derived by hand: the rate of a parabola is linear in time]. Null when straight, else the shape with the
 * change that failed (negative = slows down, positive = speeds up).
 */
export function curvedPart(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  settings: WindowCheckSettings,
  noise: number = traceNoiseVariance(trace, settings.readingNoiseFloor),
  whole: WindowShape = windowShape(trace, lo, hi, settings.nearZeroSlopePerMin, noise),
): WindowShape | null {
  const bent = curvedAsRead(trace, lo, hi, settings, noise, whole);
  if (bent !== null || settings.outlierLimitSd === undefined || hi - lo + 1 < 4) return bent;
  const suspect = isolatedReading(trace, lo, hi, settings.outlierLimitSd, noise);
  return suspect === null ? null : curvedWithout(trace, lo, hi, suspect, settings, noise);
}

/**
 * curvedPart of trace[lo..hi] without reading `skip`, one far off its neighbours (isolatedReading). Such a reading can
 * hide a bend: a bubble in the middle of a slowing window straightens its quadratic and its halves. So a window
 * must be straight both with and without it (judged without it alone, a window straddling a lag could drop the
 * reading at the kink and pass); the reading itself is the outlier check's to flag (rates.ts).
 */
function curvedWithout(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  skip: number,
  settings: Pick<LinearitySettings, 'curvatureLimitPct' | 'nearZeroSlopePerMin'>,
  noise: number,
): WindowShape | null {
  const rest = [...trace.slice(lo, skip), ...trace.slice(skip + 1, hi + 1)];
  const last = rest.length - 1;
  const bent = curvedAsRead(rest, 0, last, settings, noise, windowShape(rest, 0, last, settings.nearZeroSlopePerMin, noise));
  return bent && { ...bent, leftOut: { index: skip, t: trace[skip]!.t } };
}

/** curvedPart with every reading of the window counted. */
function curvedAsRead(
  trace: readonly TracePoint[],
  lo: number,
  hi: number,
  settings: Pick<LinearitySettings, 'curvatureLimitPct' | 'nearZeroSlopePerMin'>,
  noise: number,
  whole: WindowShape,
): WindowShape | null {
  if (!isStraight(whole, settings.curvatureLimitPct)) return whole;
  const n = hi - lo + 1;
  if (n < MIN_FOR_HALVES) return null;
  if (!Number.isFinite(noise)) return null;
  const nearZero = settings.nearZeroSlopePerMin;
  const halves = partSlopes(trace, lo, hi, 2);
  const [first, second] = halves.slopes as [number, number];
  const halvesShape = {
    ...whole,
    changePct: relativePct(Math.abs(second) - Math.abs(first), Math.max(Math.abs(first), Math.abs(second)), nearZero),
    significant: contrastSignificant(second - first, [-1, 1], halves, noise),
  };
  if (!isStraight(halvesShape, settings.curvatureLimitPct)) return halvesShape;
  if (n >= MIN_FOR_THIRDS) {
    const thirds = partSlopes(trace, lo, hi, 3);
    const [a, m, c] = thirds.slopes as [number, number, number];
    const ends = (Math.abs(a) + Math.abs(c)) / 2;
    const shape = {
      ...whole,
      // An S (middle faster than the ends) is reported as a window whose ends run slower than its middle.
      changePct: relativePct(ends - Math.abs(m), Math.max(ends, Math.abs(m)), nearZero),
      significant: contrastSignificant(m - (a + c) / 2, [-0.5, 1, -0.5], thirds, noise),
    };
    if (!isStraight(shape, settings.curvatureLimitPct)) return shape;
  }
  return null;
}

export interface FoundWindow {
  kind: 'found';
  lo: number;
  hi: number;
  shape: WindowShape;
  /** Set when the window starts after the first reading because the opening readings ran slower. */
  lag: { readings: number; toS: number; openingSlopePerMin: number; slowerPct: number } | null;
  /**
   * Set when the window starts later than an earlier one of the same rate, `fromS`, because that one held a reading
   * far off its neighbours (`index`, at `t`) and this longer one does not: `readings` readings are left out.
   */
  avoided: { index: number; t: number; readings: number; fromS: number; toS: number } | null;
}

export interface NoWindow {
  kind: 'none';
  /**
   * The earliest shortest window that is not straight (preferring one that slows down), to say how curved the trace
   * is; or, when every start had a straight window but the readings after each ran faster (`fasterAfter`), the first
   * of those.
   */
  lo: number;
  hi: number;
  shape: WindowShape;
  fasterAfter?: true;
}

/**
 * The automatic rate window:
 * 1. for every start within `lagMaxS` of the first reading (leaving at least `minPoints` readings), the
 *    longest straight window from that start (searched from the longest down; straight as a whole and in
 *    each half, see curvedPart);
 * 2. of those, the earliest start whose rate is within noise of the fastest one (4·√2 standard errors of
 *    the fastest window's slope, and at least 0.5%): a slower opening stretch is a lag and is stepped over, while on a straight trace
 *    every start gives the same rate and the first reading is kept; rates are compared without a reading far off
 *    its neighbours (isolatedReading), and a window holding one gives way to a longer one of the same rate
 *    without it (`avoided`);
 * 3. no straight window at all → `none`: the caller refuses to give a rate rather than fit a curve.
 */
export function findLinearWindow(trace: readonly TracePoint[], settings: LinearitySettings): FoundWindow | NoWindow {
  const last = trace.length - 1;
  const minPoints = Math.max(3, settings.minPoints);
  const t0 = trace[0]!.t;
  // `rate`: the window's slope without its isolated reading (isolatedReading), if any: one bubble must not make a
  // flat stretch look like the fastest rate, nor hide that the readings after it run faster.
  const candidates: { lo: number; hi: number; shape: WindowShape; rate: number; suspect: number }[] = [];
  let firstShortest: { lo: number; hi: number; shape: WindowShape } | null = null;
  let firstSlowing: { lo: number; hi: number; shape: WindowShape } | null = null;
  // The first straight window left out because the readings after it ran faster (a lag, or a jump in level).
  let firstBeforeFaster: { lo: number; hi: number; shape: WindowShape } | null = null;

  // One pass over the readings gives both the trace's noise and each reading's distance from its neighbours.
  const pseudo = pseudoResiduals(trace);
  const noise = noiseVarianceOf(pseudo, settings.readingNoiseFloor ?? 0);
  const sizes = spikeSizes(pseudo);
  const limit = settings.outlierLimitSd === undefined ? Number.POSITIVE_INFINITY : settings.outlierLimitSd * Math.sqrt(noise);
  // worstFrom[i]: the reading of trace[lo..i] furthest off its neighbours beyond the limit (isolatedReading), −1 if none.
  const worstFrom = new Array<number>(trace.length).fill(-1);
  for (let lo = 0; lo + minPoints - 1 <= last && trace[lo]!.t - t0 <= settings.lagMaxS; lo += 1) {
    // A window never starts on a reading far off its neighbours: its line would lean on it (the next start is tried),
    // and the readings before it, taken for a lag, would be measured through it.
    if (sizes[lo]! > limit) continue;
    // Longest first: all readings from lo, then shrink from the end until the window is straight.
    const sums = new WindowSums(trace[lo]!.t, trace[lo]!.a);
    for (let i = lo; i <= last; i += 1) {
      sums.add(trace[i]!);
      const before = i > lo ? worstFrom[i - 1]! : -1;
      worstFrom[i] = sizes[i]! > limit && (before < 0 || sizes[i]! > sizes[before]!) ? i : before;
    }
    for (let hi = last; hi - lo + 1 >= minPoints; hi -= 1) {
      const shape = sums.shape(settings.nearZeroSlopePerMin, noise);
      const suspect = worstFrom[hi]!;
      // Straight as read and without a reading far off its neighbours (curvedPart); a window of the minimum length
      // that holds one has one good reading too few.
      const straight =
        isStraight(shape, settings.curvatureLimitPct) &&
        curvedAsRead(trace, lo, hi, settings, noise, shape) === null &&
        (suspect < 0 || (hi - lo + 1 > minPoints && curvedWithout(trace, lo, hi, suspect, settings, noise) === null));
      if (straight) {
        const judged = lineSums(trace, lo, hi, suspect < 0 ? null : suspect);
        if (!runsFasterAfter(trace, hi, judged, minPoints, settings, noise, (from, to) => worstIn(sizes, from, to, limit))) {
          candidates.push({ lo, hi, shape, rate: judged.slope, suspect });
        } else if (firstBeforeFaster === null) {
          firstBeforeFaster = { lo, hi, shape };
        }
        break;
      }
      // The earliest shortest window that is not straight explains a refusal: preferably one that slows down
      // (the reaction's own bend, after any lag), else the first.
      if (hi - lo + 1 === minPoints) {
        if (firstShortest === null) firstShortest = { lo, hi, shape };
        if (firstSlowing === null && shape.changePct < 0) firstSlowing = { lo, hi, shape };
      }
      sums.remove(trace[hi]!);
    }
  }

  if (candidates.length === 0) {
    const bent = firstSlowing ?? firstShortest;
    if (bent === null && firstBeforeFaster !== null) return { kind: 'none', ...firstBeforeFaster, fasterAfter: true };
    const fallback = bent ?? { lo: 0, hi: last, shape: windowShape(trace, 0, last, settings.nearZeroSlopePerMin, noise) };
    return { kind: 'none', ...fallback };
  }

  let fastest = candidates[0]!;
  for (const c of candidates) if (Math.abs(c.rate) > Math.abs(fastest.rate)) fastest = c;
  const top = Math.abs(fastest.rate);
  // The allowance is the fastest window's own noise (as if the two were independent), not the other
  // window's: a window straddling a lag has a large residual SD from the kink itself, which must not excuse it.
  const allowance = Math.max(4 * Math.SQRT2 * finiteOr0(fastest.shape.slopeSePerMin), 0.005 * top);
  const equal = candidates.filter((c) => Math.abs(c.rate) >= top - allowance);
  const earliest = equal[0] ?? fastest;
  // A window holding a reading far off its neighbours gives way to a longer one of the same rate without it.
  const chosen = earliest.suspect < 0 ? earliest : (equal.find((c) => c.suspect < 0 && c.hi - c.lo > earliest.hi - earliest.lo) ?? earliest);
  const avoided: FoundWindow['avoided'] =
    chosen === earliest
      ? null
      : { index: earliest.suspect, t: trace[earliest.suspect]!.t, readings: chosen.lo - earliest.lo, fromS: trace[earliest.lo]!.t, toS: trace[chosen.lo]!.t };

  // The lag is what comes before the earliest window of the fastest rate (the rest, if any, was avoided).
  let lag: FoundWindow['lag'] = null;
  if (earliest.lo > 0) {
    // The opening readings' own rate, from a line through them and the window's first reading, without a reading
    // far off its neighbours (a bubble in the lag once made the lag "−11.6% slower" than the reaction).
    const opening = lineSums(trace, 0, earliest.lo, earliest.lo >= 2 ? worstIn(sizes, 0, earliest.lo, limit) : null).slope;
    lag = {
      readings: earliest.lo,
      toS: trace[earliest.lo]!.t,
      openingSlopePerMin: opening,
      slowerPct: chosen.shape.slopePerMin !== 0 ? (100 * (Math.abs(chosen.shape.slopePerMin) - Math.abs(opening))) / Math.abs(chosen.shape.slopePerMin) : 0,
    };
  }
  return { kind: 'found', lo: chosen.lo, hi: chosen.hi, shape: chosen.shape, lag, avoided };
}

/**
 * Whether the readings just after a window ending at trace[hi] (its last reading and the next minPoints − 1) run
 * faster than the window itself (`window`, its straight line), beyond the curvature limit and beyond noise: the
 * window then lies in a lag, before the reaction got going (a flat opening followed by a fall), and says nothing of
 * the reaction's rate. Judged like the halves of a window (curvedPart), the window and what follows it being the
 * two halves.
 */
function runsFasterAfter(
  trace: readonly TracePoint[],
  hi: number,
  window: ReturnType<WindowSums['line']>,
  minPoints: number,
  settings: Pick<LinearitySettings, 'curvatureLimitPct' | 'nearZeroSlopePerMin'>,
  noise: number,
  isolatedIn: (from: number, to: number) => number | null,
): boolean {
  const end = Math.min(trace.length - 1, hi + minPoints - 1);
  if (end - hi + 1 < 3) return false;
  // Without a reading far off its neighbours, as for the window (a bubble just after a lag must not hide the fall).
  const after = lineSums(trace, hi, end, end - hi + 1 > 3 ? isolatedIn(hi, end) : null);
  const scale = Math.max(Math.abs(window.slope), Math.abs(after.slope));
  const changePct = relativePct(Math.abs(after.slope) - Math.abs(window.slope), scale, settings.nearZeroSlopePerMin);
  const df = window.n + after.n - 4;
  const parts = { slopes: [window.slope, after.slope], sxx: [window.sxx, after.sxx], variance: (window.sse + after.sse) / df, df };
  return changePct > settings.curvatureLimitPct && contrastSignificant(after.slope - window.slope, [-1, 1], parts, noise);
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
