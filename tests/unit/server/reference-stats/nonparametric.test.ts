import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import {
  NONPARAMETRIC_MIN_N,
  nonparametricCiRanks,
  nonparametricInterval,
} from '../../../../server/domain/reference-stats/nonparametric';

/** A fixed permutation so the function has to sort. */
function shuffled(values: number[]): number[] {
  return values.map((v, i) => ({ v, key: (i * 7919) % values.length })).sort((a, b) => a.key - b.key).map((e) => e.v);
}

/** P(X < k) for X ~ Binomial(n, 0.025), summed from simple-statistics' mass function. */
function binomialBelow(n: number, k: number): number {
  const pmf = ss.binomialDistribution(n, 0.025) ?? [];
  return pmf.slice(0, Math.max(0, k)).reduce((a, b) => a + b, 0);
}

describe('nonparametricCiRanks', () => {
  it('when n = 120, then the 90% CIs span ranks 1–7 and 114–120 [from memory: CLSI EP28-A3c table]', () => {
    const ranks = nonparametricCiRanks(120);
    expect(ranks.lowerCi).toEqual([1, 7]);
    expect(ranks.upperCi).toEqual([114, 120]);
  });

  it('when n = 120, then the coverage is P(1 ≤ X ≤ 6) for X ~ Bin(120, 0.025), checked with simple-statistics', () => {
    const expected = binomialBelow(120, 7) - binomialBelow(120, 1);
    expect(nonparametricCiRanks(120).coverage).toBeCloseTo(expected, 10);
    expect(expected).toBeGreaterThanOrEqual(0.9);
  });

  it('for any n ≥ 120 the ranks are the tightest equal-tailed pair with each tail ≤ 5% (simple-statistics binomial)', () => {
    // The rule stated in nonparametric.ts, checked against an independent binomial mass function.
    fc.assert(
      fc.property(fc.integer({ min: NONPARAMETRIC_MIN_N, max: 800 }), (n) => {
        const { lowerCi, upperCi, coverage } = nonparametricCiRanks(n);
        const [r1, r2] = lowerCi;
        expect(binomialBelow(n, r1)).toBeLessThanOrEqual(0.05); // P(X < r1)
        expect(binomialBelow(n, r1 + 1)).toBeGreaterThan(0.05); // r1 cannot move up
        expect(1 - binomialBelow(n, r2)).toBeLessThanOrEqual(0.05 + 1e-12); // P(X ≥ r2)
        expect(1 - binomialBelow(n, r2 - 1)).toBeGreaterThan(0.05); // r2 cannot move down
        expect(coverage).toBeGreaterThanOrEqual(0.9);
        expect(upperCi).toEqual([n + 1 - r2, n + 1 - r1]);
      }),
      { numRuns: 60 },
    );
  });
});

describe('nonparametricInterval', () => {
  it('when the values are 1..120, then the limits are at ranks 3.025 and 117.975 [derived from EP28-A3c ranks]', () => {
    // 0.025 × 121 = 3.025 → 3 + 0.025 × (4 − 3); 0.975 × 121 = 117.975 → 117 + 0.975 × (118 − 117).
    const values = shuffled(Array.from({ length: 120 }, (_, i) => i + 1));
    const r = nonparametricInterval(values);
    expect(r.n).toBe(120);
    expect(r.lower).toBeCloseTo(3.025, 12);
    expect(r.upper).toBeCloseTo(117.975, 12);
    expect(r.lowerCi).toEqual([1, 7]);
    expect(r.upperCi).toEqual([114, 120]);
    expect(r.ranks.lower).toBeCloseTo(3.025, 12);
    expect(r.ranks.upper).toBeCloseTo(117.975, 12);
  });

  it('agrees with simple-statistics quantileSorted at the equivalent type-7 probability [derived]', () => {
    // EP28 rank (n + 1)p equals simple-statistics' rank 1 + p'(n − 1) at p' = ((n + 1)p − 1)/(n − 1).
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: 500, noNaN: true }), { minLength: 120, maxLength: 400 }),
        (values) => {
          const sorted = [...values].sort((a, b) => a - b);
          const n = sorted.length;
          const pPrime = (p: number) => ((n + 1) * p - 1) / (n - 1);
          const r = nonparametricInterval(values);
          expect(r.lower).toBeCloseTo(ss.quantileSorted(sorted, pPrime(0.025)), 8);
          expect(r.upper).toBeCloseTo(ss.quantileSorted(sorted, pPrime(0.975)), 8);
          expect(r.lowerCi[0]).toBeLessThanOrEqual(r.lower);
          expect(r.lowerCi[1]).toBeGreaterThanOrEqual(r.lower);
          expect(r.upperCi[0]).toBeLessThanOrEqual(r.upper);
          expect(r.upperCi[1]).toBeGreaterThanOrEqual(r.upper);
        },
      ),
      { numRuns: 40 },
    );
  });

  it('when fewer than 120 values are given, then it throws a typed error naming the values field [confirmed: EP28-A3c]', () => {
    const values = Array.from({ length: 119 }, (_, i) => i);
    let caught: unknown;
    try {
      nonparametricInterval(values);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(ReferenceStatsInputError);
    const error = caught as ReferenceStatsInputError;
    expect(error.field).toBe('values');
    expect(error.status).toBe(400);
    expect(error.message).toMatch(/at least 120 values.*got 119/);
  });
});
