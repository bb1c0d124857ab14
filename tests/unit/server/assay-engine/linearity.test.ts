import { describe, expect, it } from 'vitest';
import type { TracePoint } from '@/schemas/assay';
import {
  CURVATURE_ALPHA,
  WindowSums,
  findLinearWindow,
  windowShape,
  worstOutlier,
} from '../../../../server/domain/assay-engine/linearity';

/*
 * The straightness test of a window against analytic truths.
 * - Orthogonal polynomials for four equally spaced points x = 0, 1, 2, 3: linear (−3, −1, 1, 3), quadratic
 *   (1, −1, −1, 1) = x² − 3x + 1, cubic (−1, 3, −3, 1) (Fisher & Yates, Statistical Tables [from memory;
 *   checkable: each pair's dot product is 0]). For y = βq·quadratic + γ·cubic + line, the quadratic fit's x²
 *   coefficient is βq, its residual sum of squares 20γ², and the t of the x² term βq / (√(20γ²/1) / √4)
 *   [derived by hand: the coefficient's SE is s/√(q·q), q·q = 4].
 * - Student's t, two-sided α = 0.01 with 1 degree of freedom: t = 63.657 (standard t tables [confirmed]).
 * - Standard error of a slope, s/√Sxx (Draper & Smith, Applied Regression Analysis, ch. 1 [from memory]).
 * - A parabola read at evenly spaced x from 0 to X: the straight line's slope is the slope at the middle,
 *   b + cX; the quadratic's starting slope is b [derived by hand].
 * Times are in seconds, x in minutes.
 */
const atMinutes = (ys: number[]): TracePoint[] => ys.map((a, i) => ({ t: i * 60, a }));
const quad = [1, -1, -1, 1];
const cubic = [-1, 3, -3, 1];

describe('windowShape: four readings, orthogonal polynomials', () => {
  it('βq = 0.1, γ = 0.02 on a line of slope 0.5: t = √5 = 2.236, not significant with 1 df', () => {
    const ys = [0, 1, 2, 3].map((x, i) => 0.2 + 0.5 * x + 0.1 * quad[i]! + 0.02 * cubic[i]!);
    const s = windowShape(atMinutes(ys), 0, 3, 0.001);
    expect(s.n).toBe(4);
    expect(s.curvatureT).toBeCloseTo(Math.sqrt(5), 9);
    expect(s.significant).toBe(false);
  });

  it('the t limit with 1 df is 63.657: βq = 2.8 gives t 62.6 (not significant), βq = 2.9 gives 64.8 (significant)', () => {
    expect(CURVATURE_ALPHA).toBe(0.01);
    const se = Math.sqrt(20 * 0.02 * 0.02) / 2;
    const run = (beta: number) =>
      windowShape(atMinutes([0, 1, 2, 3].map((x, i) => 0.2 + 0.5 * x + beta * quad[i]! + 0.02 * cubic[i]!)), 0, 3, 0.001);
    const below = run(2.8);
    expect(below.curvatureT).toBeCloseTo(2.8 / se, 9);
    expect(below.significant).toBe(false);
    const above = run(2.9);
    expect(above.curvatureT).toBeCloseTo(2.9 / se, 9);
    expect(above.significant).toBe(true);
    // A negative curvature is judged by its size.
    expect(run(-2.9).significant).toBe(true);
    expect(run(-2.9).curvatureT).toBeCloseTo(-2.9 / se, 9);
  });

  it('a noise-free parabola: start rate b, line b + cX, t infinite with the sign of c, significant', () => {
    // A = 1 − 0.1x + 0.01x², x = 0..3: start −0.1, line −0.07, change −30% [derived].
    const s = windowShape(atMinutes([0, 1, 2, 3].map((x) => 1 - 0.1 * x + 0.01 * x * x)), 0, 3, 0.001);
    expect(s.startSlopePerMin).toBeCloseTo(-0.1, 12);
    expect(s.slopePerMin).toBeCloseTo(-0.07, 12);
    expect(s.changePct).toBeCloseTo(-30, 9);
    // Residuals are 0 up to rounding, so t is (near) infinite: far beyond any limit.
    expect(s.curvatureT).toBeGreaterThan(1e5);
    expect(s.significant).toBe(true);
    const down = windowShape(atMinutes([0, 1, 2, 3].map((x) => 1 + 0.1 * x - 0.01 * x * x)), 0, 3, 0.001);
    expect(down.curvatureT).toBeLessThan(-1e5);
    expect(down.changePct).toBeCloseTo(-30, 9);
  });

  it('an exact line: no curvature (t about 0, not significant), change 0, r² 1, slope SE 0', () => {
    const s = windowShape(atMinutes([0.5, 0.6, 0.7, 0.8, 0.9]), 0, 4, 0.001);
    expect(Math.abs(s.curvatureT)).toBeLessThan(1);
    expect(s.significant).toBe(false);
    expect(s.changePct).toBeCloseTo(0, 6);
    expect(s.r2).toBeCloseTo(1, 12);
    expect(s.slopeSePerMin).toBeCloseTo(0, 6);
    expect(s.slopePerMin).toBeCloseTo(0.1, 12);
  });

  it('slope, its SE and r² of y = 0, 2, 1, 3 at x = 0..3: 0.8, √(0.9/5), 0.64', () => {
    // Sxx 5, SSE 1.8, s² = 0.9 [derived by hand, as in regression-worked.test.ts].
    const s = windowShape(atMinutes([0, 2, 1, 3]), 0, 3, 0.001);
    expect(s.slopePerMin).toBeCloseTo(0.8, 12);
    expect(s.slopeSePerMin).toBeCloseTo(Math.sqrt(0.9 / 5), 12);
    expect(s.r2).toBeCloseTo(0.64, 12);
  });

  it('a flat window: r² 0 (undefined), change 0', () => {
    const s = windowShape(atMinutes([0.5, 0.5, 0.5, 0.5]), 0, 3, 0.001);
    expect(s.r2).toBe(0);
    expect(s.changePct).toBe(0);
  });

  it('three readings of a curve: no degree of freedom left, so the bend counts as significant', () => {
    const s = windowShape(atMinutes([1, 0.91, 0.84]), 0, 2, 0.001);
    expect(s.significant).toBe(true);
    expect(s.curvatureT).not.toBe(0);
  });

  it('a window later in the trace is measured from its own first reading', () => {
    // Readings 2..5 of the parabola above, with other readings before: x restarts at the window's start, so
    // the start rate is the derivative at x = 2: −0.1 + 0.04 = −0.06 [analytic].
    const ys = [0, 1, 2, 3, 4, 5].map((x) => 1 - 0.1 * x + 0.01 * x * x);
    const s = windowShape(atMinutes(ys), 2, 5, 0.001);
    expect(s.startSlopePerMin).toBeCloseTo(-0.06, 12);
    expect(s.slopePerMin).toBeCloseTo(-0.03, 12);
    expect(s.n).toBe(4);
  });
});

describe('changePct near zero (relative change of two tiny rates means nothing)', () => {
  // A = 1 − 0.0004x + 0.0001x², x = 0..3: start −0.0004, line −0.0001; both under 0.001 → 0.
  const tiny = atMinutes([0, 1, 2, 3].map((x) => 1 - 0.0004 * x + 0.0001 * x * x));
  it('both rates below the near-zero limit: change 0', () => {
    expect(windowShape(tiny, 0, 3, 0.001).changePct).toBe(0);
  });
  it('the larger rate exactly at the limit: the change is computed (−75%)', () => {
    expect(windowShape(tiny, 0, 3, 0.0004).changePct).toBeCloseTo(-75, 9);
  });
  it('a limit of 0 still never divides by zero on a flat window', () => {
    expect(windowShape(atMinutes([1, 1, 1, 1]), 0, 3, 0).changePct).toBe(0);
  });
});

describe('WindowSums.remove', () => {
  it('adding five readings and removing the last gives the shape of the first four', () => {
    const t = atMinutes([0, 2, 1, 3, 10]);
    const sums = new WindowSums(t[0]!.t, t[0]!.a);
    for (const p of t) sums.add(p);
    sums.remove(t[4]!);
    const a = sums.shape(0.001);
    const b = windowShape(t, 0, 3, 0.001);
    expect(a.n).toBe(4);
    expect(a.slopePerMin).toBeCloseTo(b.slopePerMin, 12);
    expect(a.curvatureT).toBeCloseTo(b.curvatureT, 9);
    expect(a.r2).toBeCloseTo(b.r2, 12);
  });
});

const settings = { minPoints: 5, curvatureLimitPct: 5, lagMaxS: 120, nearZeroSlopePerMin: 0.001 };

describe('findLinearWindow', () => {
  it('a trace shorter than the minimum: none, over the whole trace', () => {
    const r = findLinearWindow(atMinutes([1, 0.9, 0.8, 0.7]), settings);
    expect(r.kind).toBe('none');
    expect(r.lo).toBe(0);
    expect(r.hi).toBe(3);
  });

  it('a straight trace: all of it, no lag', () => {
    const t = Array.from({ length: 20 }, (_, i) => ({ t: i * 10, a: 1 - 0.002 * i }));
    const r = findLinearWindow(t, settings);
    expect(r).toMatchObject({ kind: 'found', lo: 0, hi: 19, lag: null });
  });

  it('a flat opening of 30 s then a line of 0.06/min: the lag is stepped over, its rate and share given', () => {
    // Flat 0.3 for t ≤ 30 s, then +0.001 per s. Opening line through readings 0..3 (all 0.3) is flat: 0/min;
    // the window's slope is 0.06/min, so the opening was 100% slower [analytic].
    const t = Array.from({ length: 20 }, (_, i) => ({ t: i * 10, a: i <= 3 ? 0.3 : 0.3 + 0.01 * (i - 3) }));
    const r = findLinearWindow(t, settings);
    expect(r.kind).toBe('found');
    if (r.kind !== 'found') return;
    expect(r.lo).toBe(3);
    expect(r.hi).toBe(19);
    expect(r.shape.slopePerMin).toBeCloseTo(0.06, 9);
    expect(r.lag).toEqual({ readings: 3, toS: 30, openingSlopePerMin: 0, slowerPct: 100 });
  });

  it('a half-speed opening: slower by 50% of the window’s rate', () => {
    // 0.03/min for t ≤ 40 s, then 0.06/min: the opening line through readings 0..4 is 0.03/min [analytic].
    const t = Array.from({ length: 24 }, (_, i) => ({
      t: i * 10,
      a: i <= 4 ? 0.3 + 0.0005 * i * 10 : 0.3 + 0.02 + 0.001 * (i - 4) * 10,
    }));
    const r = findLinearWindow(t, settings);
    if (r.kind !== 'found') throw new Error('expected a window');
    expect(r.lo).toBe(4);
    expect(r.lag!.openingSlopePerMin).toBeCloseTo(0.03, 9);
    expect(r.lag!.slowerPct).toBeCloseTo(50, 9);
  });

  it('a lag longer than lagMaxS is not stepped over: no start after 120 s is tried', () => {
    // Flat until 150 s, then a line: starts are tried only up to 120 s, and each of those windows still holds
    // the kink, so there is no straight window of 5 readings or more from any of them.
    const t = Array.from({ length: 30 }, (_, i) => ({ t: i * 10, a: i <= 15 ? 0.3 : 0.3 + 0.01 * (i - 15) }));
    const r = findLinearWindow(t, settings);
    expect(r.kind === 'found' ? r.lo : -1).toBeLessThanOrEqual(12);
    const longer = findLinearWindow(t, { ...settings, lagMaxS: 150 });
    expect(longer.kind).toBe('found');
    expect(longer.lo).toBe(15);
  });

  it('no straight window: the first window of the minimum length is reported with its shape', () => {
    const t = Array.from({ length: 11 }, (_, i) => ({ t: i * 10, a: 1 - 0.1 * (i / 6) + 0.02 * (i / 6) ** 2 }));
    const r = findLinearWindow(t, settings);
    expect(r.kind).toBe('none');
    expect(r.lo).toBe(0);
    expect(r.hi).toBe(4);
    expect(r.shape.n).toBe(5);
  });

  it('a minimum of 3 or less still asks for 3 readings', () => {
    const r = findLinearWindow(atMinutes([1, 0.9, 0.8]), { ...settings, minPoints: 2 });
    expect(r).toMatchObject({ kind: 'found', lo: 0, hi: 2 });
    expect(findLinearWindow(atMinutes([1, 0.9]), { ...settings, minPoints: 2 }).kind).toBe('none');
  });
});

describe('worstOutlier', () => {
  // Seven readings exactly on a line: the others' SD is 0, so the floor (0.002) sets the scale [analytic].
  const line = (bumps: Record<number, number>) =>
    Array.from({ length: 7 }, (_, i) => ({ t: i * 10, a: 1 - 0.001 * i + (bumps[i] ?? 0) }));

  it('of two stray readings both beyond the limit, the further is named even when it comes first', () => {
    const t = Array.from({ length: 40 }, (_, i) => ({ t: i * 10, a: 1 - 0.001 * i + (i === 3 ? -0.06 : i === 20 ? 0.05 : 0) }));
    const r = worstOutlier(t, 0, 39, 4, 0.002)!;
    expect(r.index).toBe(3);
    expect(r.deviation).toBeLessThan(0);
    // The other one is beyond the limit too (screened on its own).
    expect(worstOutlier(t, 10, 39, 4, 0.002)!.index).toBe(20);
  });

  it('only readings from lo to hi are screened, and the index counts from the start of the trace', () => {
    const t = line({ 0: 0.5 });
    expect(worstOutlier(t, 1, 6, 4, 0.002)).toBeNull();
    const r = worstOutlier(line({ 6: 0.05 }), 1, 6, 4, 0.002)!;
    expect(r.index).toBe(6);
    expect(r.t).toBe(60);
    expect(r.a).toBeCloseTo(1 - 0.006 + 0.05, 12);
  });

  it('with real scatter the others’ residual SD, not the floor, sets the scale', () => {
    // Alternating ±0.01 about a line on 8 readings and one reading 0.2 off: far beyond 4 SDs of the others,
    // but only 0.2/0.01-ish = about 20 SDs, not 0.2/0.002 = 100.
    const t = Array.from({ length: 9 }, (_, i) => ({ t: i * 10, a: 1 - 0.001 * i + (i === 4 ? 0.2 : i % 2 ? 0.01 : -0.01) }));
    const r = worstOutlier(t, 0, 8, 4, 0.002)!;
    expect(r.index).toBe(4);
    expect(r.sds).toBeGreaterThan(10);
    expect(r.sds).toBeLessThan(30);
  });
});
