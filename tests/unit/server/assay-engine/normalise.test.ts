import { zScore as ssZScore } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { computeRatios, percentOfMean, zScore, type ActivityMap } from '../../../../server/domain/assay-engine/normalise';

/*
 * Ratios to citrate synthase and to complex II (docs/domain.md §2: Frazier AE et al. 2020 [confirmed] for X/CS;
 * X/CII [common practice]). A ratio needs a numerator and a positive, finite denominator: x/0 is undefined and a
 * negative or infinite activity is not a measurement [analytic]. The z-score (x − mean)/SD is checked against
 * simple-statistics' zScore (npm, independent) [common practice]; an SD of 0 or below defines no z [analytic].
 */

const ratioOf = (activities: ActivityMap, assay: string, measure: 'ratio_cs' | 'ratio_cii') =>
  computeRatios(activities).find((r) => r.assay === assay && r.measure === measure)!;

describe('computeRatios: the numerator', () => {
  for (const missing of [null, undefined]) {
    it(`when CI is ${String(missing)}, then CI/CS and CI/CII are withheld with MISSING_VALUE naming CI`, () => {
      const activities: ActivityMap = { CI: missing, CS: 150, CII: 40 };
      for (const [measure, den] of [
        ['ratio_cs', 'CS'],
        ['ratio_cii', 'CII'],
      ] as const) {
        const r = ratioOf(activities, 'CI', measure);
        expect(r.value).toBeNull();
        expect(r.measure).toBe(measure);
        expect(r.flags).toEqual([{ code: 'MISSING_VALUE', message: `CI/${den}: no CI activity` }]);
      }
    });
  }

  it('when the numerator is 0, then the ratio is 0 (a measured zero, not a missing value)', () => {
    // Ratios to CS (docs/domain.md §2, Frazier 2020 [confirmed]); a measured 0 is a value [common practice].
    // 0 / 150 = 0 [analytic].
    const r = ratioOf({ CI: 0, CS: 150 }, 'CI', 'ratio_cs');
    expect(r.value).toBe(0);
    expect(r.flags).toEqual([]);
  });

  it('when both numerator and denominator are missing, then only the numerator is reported missing', () => {
    const r = ratioOf({}, 'CIV', 'ratio_cii');
    expect(r.value).toBeNull();
    expect(r.flags.map((f) => f.code)).toEqual(['MISSING_VALUE']);
  });
});

describe('computeRatios: the denominator at and around zero', () => {
  it('when CS is missing (null or absent), then NO_DENOMINATOR says it is missing', () => {
    for (const activities of [{ CIII: 120, CS: null }, { CIII: 120 }] as ActivityMap[]) {
      const r = ratioOf(activities, 'CIII', 'ratio_cs');
      expect(r.value).toBeNull();
      expect(r.flags).toEqual([{ code: 'NO_DENOMINATOR', message: 'CIII/CS: the CS activity is missing' }]);
    }
  });

  it('when CII is exactly 0, negative, NaN or infinite, then NO_DENOMINATOR names the value', () => {
    for (const den of [0, -0.5, Number.NaN, Number.POSITIVE_INFINITY]) {
      const r = ratioOf({ CIV: 180, CII: den }, 'CIV', 'ratio_cii');
      expect(r.value).toBeNull();
      expect(r.flags).toEqual([
        { code: 'NO_DENOMINATOR', message: `CIV/CII: the CII activity is not a positive number (${String(den)})` },
      ]);
    }
  });

  it('when CS is just above 0, then the ratio is given (the limit is "above zero", not a minimum activity)', () => {
    // Only a non-positive denominator makes the ratio meaningless [derived]; how small a measured CS may be
    // is the near-zero flag's business, set per assay by the laboratory [common practice].
    // 1e-6 / 1e-3 = 1e-3 [analytic].
    const r = ratioOf({ CI: 1e-6, CS: 1e-3 }, 'CI', 'ratio_cs');
    expect(r.value).toBeCloseTo(1e-3, 15);
    expect(r.flags).toEqual([]);
  });
});

describe('percentOfMean and zScore', () => {
  it('percent of mean on hand-worked values', () => {
    // 30 of a mean of 150 is 20% [analytic]; 0.3 of 0.25 is 120%.
    expect(percentOfMean(30, 150)).toBeCloseTo(20, 12);
    expect(percentOfMean(0.3, 0.25)).toBeCloseTo(120, 12);
  });

  it('z-score matches simple-statistics for a positive SD', () => {
    for (const [x, m, sd] of [
      [0.05, 0.25, 0.05],
      [190, 150, 30],
      [1, 1, 1e-9],
    ] as const) {
      expect(zScore(x, m, sd)).toBeCloseTo(ssZScore(x, m, sd), 9);
    }
  });

  it('when the SD is exactly 0, negative or unknown, then there is no z-score; just above 0 there is', () => {
    expect(zScore(2, 1, 0)).toBeNull();
    expect(zScore(2, 1, -1)).toBeNull();
    expect(zScore(2, 1, null)).toBeNull();
    // (2 − 1) / 1e-3 = 1000 [analytic].
    expect(zScore(2, 1, 1e-3)).toBeCloseTo(1000, 9);
  });
});
