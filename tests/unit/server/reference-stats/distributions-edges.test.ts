import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  binomialCdfTable,
  lnGamma,
  regularizedBeta,
  studentTCdf,
  studentTQuantile,
} from '../../../../server/domain/reference-stats/distributions';

/*
 * The edges of the distribution functions: their refusals, the closed forms at the ends of each branch, and the
 * far tails. Sources:
 * - Regularised incomplete beta: I_x(a, 1) = x^a and I_x(1, b) = 1 − (1 − x)^b, I_0 = 0, I_1 = 1, and
 *   I_x(a, b) = 1 − I_{1−x}(b, a) (Abramowitz & Stegun 26.5.2 and 26.5.3 [from memory]; the closed forms follow
 *   from integrating t^(a−1) [derived]).
 * - Student's t with 1 degree of freedom is the Cauchy distribution: F(t) = 1/2 + atan(t)/π, so its quantile is
 *   tan(π(p − 1/2)) [derived, closed form]; the median of every t distribution is 0 (symmetry) [derived].
 * - Printed one-sided 95% t-table values t(0.95, 19) = 1.729, t(0.95, 9) = 1.833 [from memory: standard Student t
 *   table].
 * - Binomial: P(X ≤ n) = 1 for X ~ Bin(n, p) [derived]; cumulative sums checked against simple-statistics.
 */

describe('lnGamma: refusals and known values', () => {
  it.each([0, -1, -0.5, Number.NaN])('refuses x = %d with a RangeError naming x > 0', (x) => {
    expect(() => lnGamma(x)).toThrow(RangeError);
    expect(() => lnGamma(x)).toThrow(/needs x > 0/);
  });

  it('gives Γ(1) = Γ(2) = 1, Γ(1/4) from simple-statistics, and a tiny x through the reflection formula', () => {
    expect(lnGamma(1)).toBeCloseTo(0, 13);
    expect(lnGamma(2)).toBeCloseTo(0, 13);
    expect(lnGamma(0.25)).toBeCloseTo(ss.gammaln(0.25), 10);
    // Γ(x) ≈ 1/x − γ for small x (γ = 0.5772156649, the Euler–Mascheroni constant [confirmed]).
    expect(Math.exp(lnGamma(1e-6))).toBeCloseTo(1e6 - 0.5772156649, 3);
  });
});

describe('regularizedBeta: closed forms on both sides of the continued-fraction switch', () => {
  it('is 0 at x = 0 and below, and 1 at x = 1 and above', () => {
    expect(regularizedBeta(0, 2, 3)).toBe(0);
    expect(regularizedBeta(-0.1, 2, 3)).toBe(0);
    expect(regularizedBeta(1, 2, 3)).toBe(1);
    expect(regularizedBeta(1.2, 2, 3)).toBe(1);
  });

  it('gives I_x(a, 1) = x^a and I_x(1, b) = 1 − (1 − x)^b for small and large x [derived]', () => {
    for (const x of [0.01, 0.2, 0.5, 0.8, 0.99]) {
      for (const a of [0.5, 2, 7.5]) {
        expect(regularizedBeta(x, a, 1)).toBeCloseTo(x ** a, 12);
        expect(regularizedBeta(x, 1, a)).toBeCloseTo(1 - (1 - x) ** a, 12);
      }
    }
  });

  it('is symmetric: I_x(a, b) = 1 − I_{1−x}(b, a) (A&S 26.5.2 [from memory])', () => {
    for (const [x, a, b] of [
      [0.1, 3, 9],
      [0.6, 0.5, 12],
      [0.93, 40, 2.5],
    ] as const) {
      expect(regularizedBeta(x, a, b)).toBeCloseTo(1 - regularizedBeta(1 - x, b, a), 12);
    }
  });

  it('uses the precise complement y when it is given, instead of 1 − x', () => {
    // Near x = 1 with the complement given: I_x(1/2, 1/2) = (2/π) asin(√x) [derived: the arcsine distribution];
    // a complement of 0 means x = 1, so the answer is 1 whatever x says.
    const x = 1 - 1e-12;
    expect(regularizedBeta(x, 0.5, 0.5, 1e-12)).toBeCloseTo((2 / Math.PI) * Math.asin(Math.sqrt(x)), 10);
    expect(regularizedBeta(0.3, 2, 2, 0)).toBe(1);
  });
});

describe('studentTCdf and studentTQuantile: refusals, the median and the tails', () => {
  it.each([0, -3, Number.NaN])('refuses df = %d', (df) => {
    expect(() => studentTCdf(1, df)).toThrow(RangeError);
    expect(() => studentTCdf(1, df)).toThrow(/df must be positive/);
  });

  it('gives exactly 1/2 at t = 0 and a median of exactly 0, for any df [derived: symmetry]', () => {
    for (const df of [1, 4.5, 30]) {
      expect(studentTCdf(0, df)).toBe(0.5);
      expect(studentTQuantile(0.5, df)).toBe(0);
    }
  });

  it.each([0, 1, -0.1, 1.1, Number.NaN])('refuses p = %d', (p) => {
    expect(() => studentTQuantile(p, 5)).toThrow(RangeError);
    expect(() => studentTQuantile(p, 5)).toThrow(/p must lie in \(0, 1\)/);
    // The refusal names the p given, not 1 − p (a probability of 0 or 1 has no finite quantile [analytic]).
    expect(() => studentTQuantile(p, 5)).toThrow(`got ${p}`);
  });

  it('matches one-sided 95% t-table values (1.729 for 19 df, 1.833 for 9 df) [from memory: t table]', () => {
    expect(studentTQuantile(0.95, 19)).toBeCloseTo(1.729, 3);
    expect(studentTQuantile(0.95, 9)).toBeCloseTo(1.833, 3);
    expect(studentTQuantile(0.05, 9)).toBeCloseTo(-1.833, 3);
  });

  it('finds far quantiles of the Cauchy distribution to 10 significant digits (tan(π(p − 1/2)) [derived])', () => {
    for (const p of [0.999, 0.99999, 0.52]) {
      const exact = Math.tan(Math.PI * (p - 0.5));
      expect(Math.abs(studentTQuantile(p, 1) / exact - 1)).toBeLessThan(1e-9);
      expect(Math.abs(studentTQuantile(1 - p, 1) / -exact - 1)).toBeLessThan(1e-9);
    }
  });

  it('when the quantile would lie beyond 10^12, then it refuses instead of searching for ever', () => {
    // df = 1, p = 1 − 1e-13: tan(π(1/2 − 1e-13)) ≈ 3.2·10^12 [derived].
    expect(() => studentTQuantile(1 - 1e-13, 1)).toThrow(/t quantile out of range/);
  });

  it('gives P(T ≤ t) far in both tails of the Cauchy distribution to 10 significant digits', () => {
    for (const t of [1e3, 1e6]) {
      expect(Math.abs(studentTCdf(-t, 1) / (0.5 + Math.atan(-t) / Math.PI) - 1)).toBeLessThan(1e-9);
    }
  });
});

describe('binomialCdfTable: refusals and the ends of the table', () => {
  it.each([
    [1.5, 0.5],
    [-1, 0.5],
    [Number.NaN, 0.5],
  ])('refuses n = %d', (n, p) => {
    expect(() => binomialCdfTable(n, p)).toThrow(/n must be a whole number/);
  });

  it.each([0, 1, -0.2, 1.2, Number.NaN])('refuses p = %d', (p) => {
    expect(() => binomialCdfTable(10, p)).toThrow(/p must lie in \(0, 1\)/);
  });

  it('without an upper index gives P(X ≤ k) for every k from 0 to n, ending at 1 and never above it', () => {
    const table = binomialCdfTable(30, 0.3);
    expect(table).toHaveLength(31);
    expect(table[30]).toBeCloseTo(1, 12);
    for (const v of table) expect(v).toBeLessThanOrEqual(1);
    // Checked against simple-statistics' probability mass function.
    const pmf = ss.binomialDistribution(30, 0.3) ?? [];
    expect(table[9]).toBeCloseTo(pmf.slice(0, 10).reduce((s, m) => s + m, 0), 12);
  });

  it('stops at n when asked beyond it, and has the single entry 1 for n = 0', () => {
    expect(binomialCdfTable(5, 0.5, 99)).toHaveLength(6);
    expect(binomialCdfTable(5, 0.5, 2)).toEqual([1 / 32, 6 / 32, 16 / 32].map((v) => expect.closeTo(v, 14)));
    expect(binomialCdfTable(0, 0.4)).toEqual([1]);
  });
});
