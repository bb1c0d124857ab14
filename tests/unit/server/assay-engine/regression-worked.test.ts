import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { fitArrays, fitQuadratic, fitTraceRange } from '../../../../server/domain/assay-engine/regression';

/*
 * Least squares against numbers worked by hand, so that every part of the fit (slope, intercept, r², residual SD,
 * the number of points) is pinned, not only the slope. Residual SD = √(SSE / (n − 2)), the standard error of
 * the regression (Draper NR & Smith H, Applied Regression Analysis, 3rd ed. 1998, ch. 1 [from memory; textbook]).
 *
 * Worked example [derived by hand]: x = 0, 1, 2, 3; y = 0, 2, 1, 3.
 *   x̄ = 1.5, ȳ = 1.5, Sxx = 5, Sxy = 2.25 − 0.25 − 0.25 + 2.25 = 4 → slope 0.8, intercept 1.5 − 1.2 = 0.3;
 *   fitted 0.3, 1.1, 1.9, 2.7; residuals −0.3, 0.9, −0.9, 0.3; SSE = 1.8; SST = 5;
 *   r² = 1 − 1.8/5 = 0.64; residual SD = √(1.8/2) = √0.9 = 0.9486833.
 */
const xs = [0, 1, 2, 3];
const ys = [0, 2, 1, 3];

describe('straight-line fit: a hand-worked example', () => {
  it('fitArrays gives slope 0.8, intercept 0.3, r² 0.64, residual SD √0.9 and n 4', () => {
    const fit = fitArrays(xs, ys);
    expect(fit.slope).toBeCloseTo(0.8, 12);
    expect(fit.intercept).toBeCloseTo(0.3, 12);
    expect(fit.r2).toBeCloseTo(0.64, 12);
    expect(fit.residualSd).toBeCloseTo(Math.sqrt(0.9), 12);
    expect(fit.n).toBe(4);
    // Cross-check the r² with simple-statistics (npm) [common practice].
    const data = xs.map((x, i) => [x, ys[i]!]);
    expect(fit.r2).toBeCloseTo(rSquared(data, linearRegressionLine(linearRegression(data))), 12);
  });

  it('fitTraceRange on the same readings placed at the end of a longer trace gives the same fit', () => {
    // Readings before lo and after hi must not enter any sum.
    const trace = [
      { t: -10, a: 50 },
      ...xs.map((x, i) => ({ t: x, a: ys[i]! })),
      { t: 9, a: -40 },
    ];
    const fit = fitTraceRange(trace, 1, 4);
    expect(fit.slope).toBeCloseTo(0.8, 12);
    expect(fit.intercept).toBeCloseTo(0.3, 12);
    expect(fit.r2).toBeCloseTo(0.64, 12);
    expect(fit.residualSd).toBeCloseTo(Math.sqrt(0.9), 12);
    expect(fit.n).toBe(4);
  });

  it('fitArrays with an explicit n uses only the first n pairs', () => {
    const fit = fitArrays([...xs, 4, 5], [...ys, 100, -100], 4);
    expect(fit.slope).toBeCloseTo(0.8, 12);
    expect(fit.intercept).toBeCloseTo(0.3, 12);
    expect(fit.residualSd).toBeCloseTo(Math.sqrt(0.9), 12);
    expect(fit.n).toBe(4);
  });

  it('two points: the line passes through both (r² 1), and there is no residual SD (n − 2 = 0)', () => {
    // Analytic: a line through two points has no residual; √(SSE/(n − 2)) is undefined for n = 2.
    const fit = fitArrays([0, 2], [1, 5]);
    expect(fit.slope).toBeCloseTo(2, 12);
    expect(fit.intercept).toBeCloseTo(1, 12);
    expect(fit.r2).toBeCloseTo(1, 12);
    expect(fit.residualSd).toBeNull();
    const t = fitTraceRange([{ t: 0, a: 1 }, { t: 2, a: 5 }], 0, 1);
    expect(t.r2).toBeCloseTo(1, 12);
    expect(t.residualSd).toBeNull();
  });

  it('three points on a line: residual SD exactly 0 (not null) and r² 1', () => {
    const fit = fitArrays([0, 1, 2], [1, 3, 5]);
    expect(fit.residualSd).toBe(0);
    expect(fit.r2).toBe(1);
  });

  it('flat readings: r² is 0 (undefined, so it must not pass a threshold), the slope 0', () => {
    // 1 − SSE/SST is 0/0 when y does not vary [analytic].
    const fit = fitArrays([0, 1, 2, 3], [0.5, 0.5, 0.5, 0.5]);
    expect(fit.slope).toBe(0);
    expect(fit.r2).toBe(0);
    const t = fitTraceRange([0, 1, 2, 3].map((x) => ({ t: x, a: 0.5 })), 0, 3);
    expect(t.r2).toBe(0);
  });

  it('points with no trend at all: r² is 0, never negative', () => {
    // x = 0, 1, 2, 3, 4; y = 1, 0, 0, 0, 1 (symmetric): x̄ = 2, ȳ = 0.4, Sxy = −1.2 + 0.4 + 0 − 0.4 + 1.2 = 0 → slope 0, SSE = SST, r² 0.
    const fit = fitArrays([0, 1, 2, 3, 4], [1, 0, 0, 0, 1]);
    expect(fit.slope).toBeCloseTo(0, 12);
    expect(fit.r2).toBeCloseTo(0, 12);
    expect(fit.r2).toBeGreaterThanOrEqual(0);
  });
});

/*
 * Quadratic fits checked with orthogonal polynomials for four equally spaced points (x = 0, 1, 2, 3):
 * constant (1, 1, 1, 1), linear (−3, −1, 1, 3), quadratic (1, −1, −1, 1), cubic (−1, 3, −3, 1) (Fisher & Yates,
 * Statistical Tables, orthogonal polynomials [from memory; checkable: each pair's dot product is 0]).
 * Adding c·cubic to an exact parabola leaves the least-squares parabola unchanged and makes SSE = c²·20 [derived].
 */
describe('quadratic fit: analytic truths', () => {
  const parabola = (x: number) => 0.1 + 0.5 * x - 0.04 * x * x;

  it('an exact parabola far from x = 0 (x 100–104) comes back with its coefficients (centring undone)', () => {
    const x = [100, 101, 102, 103, 104];
    const y = x.map((v) => 2 - 0.03 * v + 0.0002 * v * v);
    const fit = fitQuadratic(x, y)!;
    expect(fit.c2).toBeCloseTo(0.0002, 9);
    expect(fit.c1).toBeCloseTo(-0.03, 6);
    expect(fit.c0).toBeCloseTo(2, 3);
    expect(fit.r2).toBeCloseTo(1, 9);
    expect(fit.n).toBe(5);
  });

  it('an exact parabola plus a cubic-orthogonal wobble: same coefficients, SSE = 20c², r² = 1 − SSE/SST', () => {
    const x = [0, 1, 2, 3];
    const cubic = [-1, 3, -3, 1];
    const c = 0.01;
    const y = x.map((v, i) => parabola(v) + c * cubic[i]!);
    const fit = fitQuadratic(x, y)!;
    expect(fit.c0).toBeCloseTo(0.1, 12);
    expect(fit.c1).toBeCloseTo(0.5, 12);
    expect(fit.c2).toBeCloseTo(-0.04, 12);
    // SST by hand from the y values [derived].
    const mean = y.reduce((s, v) => s + v, 0) / 4;
    const sst = y.reduce((s, v) => s + (v - mean) ** 2, 0);
    expect(fit.r2).toBeCloseTo(1 - (20 * c * c) / sst, 12);
    expect(fit.r2).toBeLessThan(1);
  });

  it('three points with distinct x: the parabola through them, r² 1', () => {
    const fit = fitQuadratic([0, 1, 3], [parabola(0), parabola(1), parabola(3)])!;
    expect(fit.c0).toBeCloseTo(0.1, 12);
    expect(fit.c1).toBeCloseTo(0.5, 12);
    expect(fit.c2).toBeCloseTo(-0.04, 12);
    expect(fit.r2).toBeCloseTo(1, 12);
  });

  it('fewer than three points: no quadratic', () => {
    expect(fitQuadratic([0, 1], [1, 2])).toBeNull();
    expect(fitQuadratic([], [])).toBeNull();
  });

  it('only two distinct x among many points: no unique parabola', () => {
    expect(fitQuadratic([0, 0, 1, 1, 1], [0.1, 0.2, 0.3, 0.4, 0.5])).toBeNull();
  });

  it('flat readings: r² 0, coefficients 0 but for c0', () => {
    const fit = fitQuadratic([0, 1, 2, 3], [0.7, 0.7, 0.7, 0.7])!;
    expect(fit.c0).toBeCloseTo(0.7, 12);
    expect(fit.c1).toBeCloseTo(0, 12);
    expect(fit.c2).toBeCloseTo(0, 12);
    expect(fit.r2).toBe(0);
  });

  it('readings of exactly 0: every coefficient 0, no residual and r² 0 (not 0/0)', () => {
    // SSE = SST = 0: r² is undefined and must not pass a threshold [analytic].
    const fit = fitQuadratic([0, 1, 2, 3], [0, 0, 0, 0])!;
    expect(fit.r2).toBe(0);
    expect(fit.c2).toBeCloseTo(0, 12);
  });

  it('absorbances beyond the range of a double give no fit, not infinite coefficients', () => {
    // x·y of 2 × 10³⁰⁸ overflows (largest double about 1.8 × 10³⁰⁸) [analytic].
    expect(fitQuadratic([0, 1, 2, 3], [1e308, -1e308, 1e308, -1e308])).toBeNull();
  });
});

