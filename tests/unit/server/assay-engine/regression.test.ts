import fc from 'fast-check';
import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  fitArrays,
  fitQuadratic,
  fitTraceRange,
} from '../../../../server/domain/assay-engine/regression';

const traceArb = fc
  .array(fc.double({ min: -0.5, max: 0.5, noNaN: true }), { minLength: 8, maxLength: 40 })
  .map((noise) => noise.map((e, i) => ({ t: i * 4, a: 0.5 + 0.001 * i * (1 + Math.sin(i / 5)) + e * 0.01 })));

describe('fitTraceRange and fitArrays', () => {
  it('when any sub-range is fitted, then slope, intercept and r² match simple-statistics (property)', () => {
    // Reference: simple-statistics linearRegression / rSquared (npm) [common practice].
    fc.assert(
      fc.property(traceArb, fc.nat(), fc.nat(), (trace, x, y) => {
        const lo = x % (trace.length - 2);
        const hi = lo + 2 + (y % (trace.length - lo - 2));
        const fit = fitTraceRange(trace, lo, hi);
        const data = trace.slice(lo, hi + 1).map((p) => [p.t, p.a]);
        const lr = linearRegression(data);
        expect(fit.slope).toBeCloseTo(lr.m, 10);
        expect(fit.intercept).toBeCloseTo(lr.b, 8);
        expect(fit.r2).toBeCloseTo(rSquared(data, linearRegressionLine(lr)), 8);
        expect(fit.n).toBe(hi - lo + 1);
      }),
    );
  });

  it('when two arrays are fitted, then the result matches the trace fit of the same points', () => {
    const xs = [0, 1, 2, 3, 4];
    const ys = [1.1, 2.9, 5.2, 7.1, 8.8];
    const lr = linearRegression(xs.map((x, i) => [x, ys[i]!]));
    const fit = fitArrays(xs, ys);
    expect(fit.slope).toBeCloseTo(lr.m, 12);
    expect(fit.intercept).toBeCloseTo(lr.b, 12);
  });
});

describe('fitQuadratic', () => {
  it('when the points lie exactly on a parabola, then its coefficients come back', () => {
    // Hand-computed: y = 0.02 + 0.6x − 0.05x² at x = 0, 0.5, 1, 1.5, 2 gives 0.02, 0.3075, 0.57, 0.8075, 1.02.
    const fit = fitQuadratic([0, 0.5, 1, 1.5, 2], [0.02, 0.3075, 0.57, 0.8075, 1.02])!;
    expect(fit.c0).toBeCloseTo(0.02, 12);
    expect(fit.c1).toBeCloseTo(0.6, 12);
    expect(fit.c2).toBeCloseTo(-0.05, 12);
    expect(fit.r2).toBeCloseTo(1, 12);
  });

  it('when all x are equal, then there is no fit', () => {
    expect(fitQuadratic([1, 1, 1, 1], [0.1, 0.2, 0.3, 0.4])).toBeNull();
  });
});
