import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { deriveInterval } from '../../../../server/domain/reference-stats/derive';
import { mean, sampleSd } from '../../../../server/domain/reference-stats/descriptive';
import { nonparametricInterval } from '../../../../server/domain/reference-stats/nonparametric';
import { meanTwoSdInterval, pctOfMeanInterval } from '../../../../server/domain/reference-stats/parametric';
import { valueAtRank } from '../../../../server/domain/reference-stats/quantiles';
import { verifyInterval } from '../../../../server/domain/reference-stats/verification';

/*
 * What a laboratory reads when the statistics refuse (bad input gets a clear 400 naming the field and saying
 * what to do instead [house rule]), and the small-sample edges of the descriptive statistics.
 */

const normalScores = (n: number) => Array.from({ length: n }, (_, i) => 50 + 8 * ss.probit((i + 0.5) / n));

describe('descriptive statistics at their edges', () => {
  it('sample SD: one value has none; two values have one (|a − b|/√2) [analytic]', () => {
    expect(sampleSd([5])).toBeNull();
    expect(sampleSd([])).toBeNull();
    expect(sampleSd([1, 3])).toBeCloseTo(Math.SQRT2, 14);
    expect(sampleSd([1, 3, 5])).toBeCloseTo(ss.sampleStandardDeviation([1, 3, 5]), 14);
  });

  it('the mean of no values is refused, not NaN', () => {
    expect(() => mean([])).toThrow(new RangeError('mean of no values'));
  });

  it('compensated summation keeps ten additions of 10⁻¹⁶ to 1 [from memory: Kahan 1965]', () => {
    // Exact sum 1 + 10⁻¹⁵; a plain left-to-right loop loses every 10⁻¹⁶ (1 + 10⁻¹⁶ rounds to 1) [analytic].
    const values = [1, ...Array(10).fill(1e-16)];
    expect(values.reduce((a, b) => a + b, 0)).toBe(1);
    expect(Math.abs(mean(values) * 11 - (1 + 1e-15))).toBeLessThan(3e-16);
  });
});

describe('ranks and an empty list', () => {
  it('valueAtRank of no values says so', () => {
    expect(() => valueAtRank([], 1)).toThrow(new RangeError('valueAtRank of no values'));
  });
});

describe('refusal messages say what to use instead', () => {
  it('nonparametric below 120 points to the robust method', () => {
    expect(() => nonparametricInterval(normalScores(60))).toThrow(
      'The nonparametric method needs at least 120 values (CLSI EP28-A3c); got 60. Use the robust method for smaller groups.',
    );
  });

  it('mean ± 2 SD below 10 points to % of control mean', () => {
    expect(() => meanTwoSdInterval(normalScores(5))).toThrow(
      'Mean ± 2 SD needs at least 10 values; got 5. Use "% of control mean" for smaller control groups.',
    );
  });

  it('% of control mean names what is wrong with its percentages', () => {
    expect(() => pctOfMeanInterval([1, 2, 3], { pctLower: -1 })).toThrow('The lower percentage must be 0 or more');
    expect(() => pctOfMeanInterval([1, 2, 3], { pctLower: 50, pctUpper: 40 })).toThrow(
      'The upper percentage must be a number greater than the lower percentage',
    );
  });

  it('derive names the method in its own words when too few values remain', () => {
    expect(() => deriveInterval({ method: 'nonparametric', outliers: 'none', values: normalScores(30) })).toThrow(
      'The nonparametric method needs at least 120 values; 30 remain.',
    );
    expect(() => deriveInterval({ method: 'robust', outliers: 'none', values: normalScores(12) })).toThrow(
      'The robust method needs at least 20 values; 12 remain.',
    );
    expect(() => deriveInterval({ method: 'mean2sd', outliers: 'none', values: normalScores(4) })).toThrow(
      'The mean ± 2 SD method needs at least 10 values; 4 remain.',
    );
  });

  it('derive warnings are whole sentences', () => {
    const robust = deriveInterval({ method: 'robust', outliers: 'none', values: normalScores(40) });
    expect(robust.warnings).toEqual([
      'Robust method (Horn, Pesce & Copeland 1998) used because n = 40 is below the 120 the nonparametric method ' +
        'needs; it assumes a symmetric distribution, and no confidence intervals are given.',
    ]);
    const skewed = deriveInterval({ method: 'mean2sd', outliers: 'none', values: [0, 0.1, 0.2, 0.2, 0.3, 0.5, 1, 2, 4, 8] });
    expect(skewed.warnings).toEqual([
      'The lower limit is below zero although every value is 0 or more: the data are probably skewed. ' +
        'Consider a log transform or another method.',
    ]);
  });

  it('verification names its limits and the size of a set', () => {
    const twenty = Array.from({ length: 20 }, (_, i) => 10 + (i % 5));
    expect(() => verifyInterval({ lower: Number.NaN, upper: 20, values: twenty })).toThrow('The lower limit must be a number');
    expect(() => verifyInterval({ lower: 20, upper: 10, values: twenty })).toThrow(
      'The upper limit must be greater than the lower limit',
    );
    expect(() => verifyInterval({ lower: 10, upper: 20, values: twenty.slice(0, 12) })).toThrow(
      'Verification needs at least 20 local values; got 12',
    );
    const outside = [...twenty.slice(0, 15), 0, 0, 0, 0, 0];
    const r = verifyInterval({ lower: 10, upper: 20, values: outside, additionalValues: outside });
    expect(r.message).toBe(
      'Not verified: first set 5 of 20 outside (at most 2 allowed), second set 5 of 20 outside (at most 2 allowed). ' +
        'Derive a local interval or look for an analytical or population difference.',
    );
  });
});
