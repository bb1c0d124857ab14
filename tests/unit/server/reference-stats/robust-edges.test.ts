import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  ROBUST_DEFAULTS,
  biweightLocation,
  biweightLocationSe,
  biweightScale,
  robustInterval,
} from '../../../../server/domain/reference-stats/robust';

/*
 * Edges of the robust method (CLSI EP28-A3c after Horn, Pesce & Copeland, Clin Chem 1998;44:622–631).
 * Sources:
 * - The EP28-A3c appendix calcium example (20 values) and its limits 9.049545–10.199396 as reproduced by the
 *   public R package mcradds [confirmed]; the same data give the central 90% interval only through t, so a
 *   90% interval's half-width is the 95% one scaled by t(0.95, 19)/t(0.975, 19) = 1.729/2.093 [derived;
 *   t values from memory: standard Student t table].
 * - When the MAD is 0 the biweight's u = (x − M)/(c·MAD/0.6745) is undefined: the location falls back to the
 *   median and the scale is 0 [derived from the definition].
 * - Location and scale are equivariant under x → a·x + b (scale multiplies by |a|) [derived].
 * Values are invented or the published example; no real subjects.
 */

const ep28Calcium = [
  8.9, 9.2, 9.4, 9.4, 9.5, 9.5, 9.5, 9.6, 9.6, 9.6, 9.6, 9.7, 9.7, 9.7, 9.7, 9.7, 9.8, 9.9, 9.9, 10.2,
];

describe('biweight with no spread', () => {
  it('when more than half the values are equal, then the location is that value (the median) and the scale 0', () => {
    const values = [4, 5, 5, 5, 5, 5, 9];
    expect(ss.medianAbsoluteDeviation(values)).toBe(0);
    expect(biweightLocation(values)).toBe(5);
    expect(biweightScale(values, 3.7)).toBe(0);
    expect(biweightLocationSe(values, 3.7, 5)).toBe(0);
  });
});

describe('biweight equivariance [derived]', () => {
  it('scales the spread and its standard error by |a| and shifts the location by b', () => {
    const moved = ep28Calcium.map((x) => -3 * x + 50);
    expect(biweightLocation(moved)).toBeCloseTo(-3 * biweightLocation(ep28Calcium) + 50, 9);
    expect(biweightScale(moved, 205.6)).toBeCloseTo(3 * biweightScale(ep28Calcium, 205.6), 9);
    const loc = biweightLocation(ep28Calcium);
    expect(biweightLocationSe(moved, 3.7, -3 * loc + 50)).toBeCloseTo(3 * biweightLocationSe(ep28Calcium, 3.7, loc), 9);
  });

  it('gives a value at the median no pull: adding the median itself keeps a symmetric location unchanged', () => {
    const symmetric = [1, 2, 3, 4, 5, 6, 7, 8, 9];
    expect(biweightLocation(symmetric)).toBeCloseTo(5, 12);
    expect(biweightLocation([...symmetric, 5])).toBeCloseTo(5, 12);
  });
});

describe('robustInterval options', () => {
  it('with the defaults spelled out gives the EP28-A3c appendix limits [confirmed: mcradds]', () => {
    expect(ROBUST_DEFAULTS).toEqual({ cLocation: 3.7, cSpread: 205.6, confidence: 0.95 });
    const r = robustInterval(ep28Calcium, { cLocation: 3.7, cSpread: 205.6, confidence: 0.95 });
    expect(Math.abs(r.lower - 9.049545)).toBeLessThan(1e-5);
    expect(Math.abs(r.upper - 10.199396)).toBeLessThan(1e-5);
  });

  it('with confidence 0.90 uses t(0.95, 19) = 1.729 and narrows the half-width by 1.729/2.093 [t table, from memory]', () => {
    const wide = robustInterval(ep28Calcium);
    const narrow = robustInterval(ep28Calcium, { confidence: 0.9 });
    expect(narrow.t).toBeCloseTo(1.729, 3);
    expect(narrow.location).toBe(wide.location);
    const ratio = (narrow.upper - narrow.location) / (wide.upper - wide.location);
    expect(ratio).toBeCloseTo(1.729 / 2.093, 3);
    expect(narrow.location - narrow.lower).toBeCloseTo(narrow.upper - narrow.location, 12);
  });

  it('reports the parts of the half-width: t · √(spread² + SE²) equals the distance from location to each limit', () => {
    const r = robustInterval(ep28Calcium);
    expect(r.spread).toBeGreaterThan(0);
    expect(r.locationSe).toBeGreaterThan(0);
    // The SE of a location is far smaller than the spread of single values (about spread/√n) [derived].
    expect(r.locationSe).toBeLessThan(r.spread / 2);
    expect(r.upper - r.location).toBeCloseTo(r.t * Math.hypot(r.spread, r.locationSe), 12);
  });

  it('with a smaller spread constant, values far from the median weigh less and the spread shrinks for tailed data', () => {
    // Invented control values with one far value: c = 205.6 keeps it almost at full weight, c = 3.7 drops it.
    const tailed = [...Array.from({ length: 24 }, (_, i) => 20 + (i % 6)), 60];
    const broad = robustInterval(tailed);
    const tight = robustInterval(tailed, { cSpread: 3.7 });
    expect(tight.spread).toBeLessThan(broad.spread);
    expect(tight.location).toBe(broad.location);
  });

  it('with another location constant, the location itself changes for skewed data', () => {
    const skewed = [18.2, 19.5, 20.1, 21.4, 21.9, 22.3, 23.0, 23.8, 24.4, 25.1, 25.6, 26.2, 27.0, 27.9, 28.8, 30.1, 31.5, 33.9, 36.4, 41.0, 55.0, 72.0];
    expect(robustInterval(skewed, { cLocation: 9 }).location).not.toBeCloseTo(robustInterval(skewed).location, 3);
  });

  it('refuses exactly when more than half the values are identical (the MAD is then 0), and names the values field', () => {
    // Eleven of twenty equal: the 10th and 11th smallest deviations from the median are both 0, so the MAD is 0
    // [derived], checked with simple-statistics.
    const eleven = [...Array.from({ length: 11 }, () => 50), 41, 42, 43, 44, 56, 57, 58, 59, 60];
    expect(ss.medianAbsoluteDeviation(eleven)).toBe(0);
    expect(() => robustInterval(eleven)).toThrow(
      'More than half of the values are identical, so the robust method cannot estimate their spread',
    );
    expect(() => robustInterval(eleven)).toThrow(expect.objectContaining({ field: 'values' }));
    // Exactly half (ten of twenty): the MAD is (0 + 5)/2 = 2.5, a spread exists and the interval is given.
    const ten = [...Array.from({ length: 10 }, () => 50), 41, 42, 43, 44, 45, 56, 57, 58, 59, 60];
    expect(ss.medianAbsoluteDeviation(ten)).toBe(2.5);
    const r = robustInterval(ten);
    expect(r.lower).toBeLessThan(50);
    expect(r.upper).toBeGreaterThan(50);
  });

  it('names the smaller method to use when the group is too small', () => {
    expect(() => robustInterval(ep28Calcium.slice(1))).toThrow(
      'The robust method needs at least 20 values; got 19. Use "% of control mean" for smaller control groups.',
    );
  });
});
