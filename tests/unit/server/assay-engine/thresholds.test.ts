import { mean, sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { defaultDiagnosticCriteria, type ComparisonInterval } from '@/schemas/assay';
import { compareValue, criteriaBand, findInterval, measureLabel } from '../../../../server/domain/assay-engine/compare';
import { firstNonFinite } from '../../../../server/domain/assay-engine/finite';
import { summariseReplicates } from '../../../../server/domain/assay-engine/replicates';

/*
 * Thresholds of the comparison with an interval, of the criteria bands, of the age bands that pick an
 * interval, and of the replicate CV limit, each exactly at, just below and just above its limit.
 */

/** An invented interval of the fictitious Larkspur Row laboratory. */
const interval = (over: Partial<ComparisonInterval> = {}): ComparisonInterval => ({
  id: 'larkspur-cs',
  setLabel: 'Larkspur Row invented set',
  version: 1,
  assay: 'CS',
  measure: 'activity',
  specimenType: 'skeletal_muscle',
  ageFromYears: null,
  ageToYears: null,
  basis: 'linear_rate',
  lower: 90,
  upper: 210,
  mean: 150,
  sd: 30,
  unit: 'nmol/min/mg',
  method: 'mean ± 2 SD',
  ...over,
});

const muscleAt = (ageYears: number | null) => ({ specimenType: 'skeletal_muscle' as const, ageYears });

describe('findInterval: age band edges (lower bound inclusive, upper bound exclusive)', () => {
  // Half-open age bands [from, to) so that every age falls in exactly one band of a set [common practice;
  // the interval schema documents the same convention].
  const infants = interval({ id: 'infants', ageFromYears: 0, ageToYears: 2 });
  const children = interval({ id: 'children', ageFromYears: 2, ageToYears: 16 });
  const adults = interval({ id: 'adults', ageFromYears: 16, ageToYears: null });
  const set = [infants, children, adults];
  const pick = (age: number | null) => findInterval(set, 'CS', 'activity', muscleAt(age))?.id ?? null;

  it('an age exactly on an edge belongs to the band that starts there', () => {
    expect(pick(2)).toBe('children');
    expect(pick(16)).toBe('adults');
    expect(pick(0)).toBe('infants');
  });

  it('just below an edge belongs to the band that ends there; just above, to the next', () => {
    expect(pick(1.999)).toBe('infants');
    expect(pick(2.001)).toBe('children');
    expect(pick(15.999)).toBe('children');
    expect(pick(16.001)).toBe('adults');
  });

  it('an age below the first band or with no band at all finds nothing', () => {
    expect(findInterval([children], 'CS', 'activity', muscleAt(1.999))).toBeNull();
    expect(findInterval([children], 'CS', 'activity', muscleAt(16))).toBeNull();
    expect(pick(null)).toBeNull();
  });

  it('a band open below (from = null) or above (to = null) matches every age on that side', () => {
    const upTo5 = interval({ id: 'up-to-5', ageFromYears: null, ageToYears: 5 });
    const from5 = interval({ id: 'from-5', ageFromYears: 5, ageToYears: null });
    expect(findInterval([upTo5], 'CS', 'activity', muscleAt(0))?.id).toBe('up-to-5');
    expect(findInterval([upTo5], 'CS', 'activity', muscleAt(5))).toBeNull();
    expect(findInterval([from5], 'CS', 'activity', muscleAt(120))?.id).toBe('from-5');
    // Half-open bands never match an unknown age; only an all-age interval does.
    expect(findInterval([upTo5, from5], 'CS', 'activity', muscleAt(null))).toBeNull();
    const allAges = interval({ id: 'all-ages' });
    expect(findInterval([upTo5, allAges, from5], 'CS', 'activity', muscleAt(null))?.id).toBe('all-ages');
  });

  it('other assay, measure or specimen type never match', () => {
    const all = interval({ id: 'all' });
    expect(findInterval([all], 'CI', 'activity', muscleAt(8))).toBeNull();
    expect(findInterval([all], 'CS', 'ratio_cs', muscleAt(8))).toBeNull();
    expect(findInterval([all], 'CS', 'activity', { specimenType: 'liver', ageYears: 8 })).toBeNull();
  });

  it('the narrowest matching band wins whichever order they come in; on equal width the later version', () => {
    // Widths 16 (0–16) against 14 (2–16): the 14-year band is narrower.
    const wide = interval({ id: 'wide', ageFromYears: 0, ageToYears: 16 });
    const narrow = interval({ id: 'narrow', ageFromYears: 2, ageToYears: 16 });
    expect(findInterval([wide, narrow], 'CS', 'activity', muscleAt(8))?.id).toBe('narrow');
    expect(findInterval([narrow, wide], 'CS', 'activity', muscleAt(8))?.id).toBe('narrow');
    // An open-ended band from 0 is wider than any closed one.
    const open = interval({ id: 'open', ageFromYears: 0, ageToYears: null });
    expect(findInterval([open, wide], 'CS', 'activity', muscleAt(8))?.id).toBe('wide');
    // A band open below counts from 0: null–10 (width 10) beats 0–16.
    const below10 = interval({ id: 'below10', ageFromYears: null, ageToYears: 10 });
    expect(findInterval([wide, below10], 'CS', 'activity', muscleAt(8))?.id).toBe('below10');
    const v2 = interval({ id: 'v2', version: 2, ageFromYears: 2, ageToYears: 16 });
    expect(findInterval([narrow, v2], 'CS', 'activity', muscleAt(8))?.id).toBe('v2');
    expect(findInterval([v2, narrow], 'CS', 'activity', muscleAt(8))?.id).toBe('v2');
  });

  it('an interval of the value basis wins over a narrower one of the other basis; the other is a last resort', () => {
    // A first-order k is never compared with linear-rate data (docs/domain.md §1 [from memory, Wharton &
    // Tzagoloff]); the other basis is returned only so the comparison can refuse with a reason.
    const kNarrow = interval({ id: 'k-narrow', basis: 'first_order_k', ageFromYears: 2, ageToYears: 16 });
    const linearWide = interval({ id: 'linear-wide' });
    expect(findInterval([kNarrow, linearWide], 'CS', 'activity', muscleAt(8))?.id).toBe('linear-wide');
    expect(findInterval([linearWide, kNarrow], 'CS', 'activity', muscleAt(8))?.id).toBe('linear-wide');
    expect(findInterval([kNarrow], 'CS', 'activity', muscleAt(8))?.id).toBe('k-narrow');
    expect(findInterval([linearWide, kNarrow], 'CS', 'activity', muscleAt(8), 'first_order_k')?.id).toBe('k-narrow');
  });
});

describe('compareValue: position against the limits (limits inclusive)', () => {
  // A value equal to a reference limit lies within the interval [common practice: CLSI EP28-A3c reports the
  // limits as part of the interval].
  const i = interval();
  const position = (value: number) => compareValue({ assay: 'CS', measure: 'activity', value }, i, muscleAt(8)).position;
  it('at, just below and just above each limit', () => {
    expect(position(90)).toBe('within');
    expect(position(89.999)).toBe('below');
    expect(position(90.001)).toBe('within');
    expect(position(210)).toBe('within');
    expect(position(209.999)).toBe('within');
    expect(position(210.001)).toBe('above');
  });

  it('% of mean and z-score: 75 against mean 150, SD 30 is 50% and z = −2.5 [analytic]', () => {
    const c = compareValue({ assay: 'CS', measure: 'activity', value: 75 }, i, muscleAt(8));
    expect(c.percentOfMean).toBeCloseTo(50, 12);
    expect(c.zScore).toBeCloseTo(-2.5, 12);
    expect(c.flags).toEqual([]);
    expect(c.basis).toBe('linear_rate');
  });
});

describe('compareValue: refusals', () => {
  it('a missing or non-finite value: MISSING_VALUE naming the measure, no position', () => {
    for (const value of [null, Number.NaN, Number.POSITIVE_INFINITY]) {
      const c = compareValue({ assay: 'CI', measure: 'ratio_cs', value }, interval(), muscleAt(8));
      expect(c.flags).toEqual([{ code: 'MISSING_VALUE', message: 'CI/CS: no value to compare' }]);
      expect(c.position).toBeNull();
      expect(c.percentOfMean).toBeNull();
    }
  });

  it('no interval: NO_INTERVAL naming the specimen type and the age (or no age when unknown)', () => {
    const aged = compareValue({ assay: 'CIV', measure: 'ratio_cii', value: 3 }, null, { specimenType: 'liver', ageYears: 8.25 });
    expect(aged.flags).toEqual([{ code: 'NO_INTERVAL', message: 'CIV/CII: no reference interval for liver at 8.25 years' }]);
    const unaged = compareValue({ assay: 'CIV', measure: 'activity', value: 3 }, null, { specimenType: 'fibroblasts', ageYears: null });
    expect(unaged.flags).toEqual([
      { code: 'NO_INTERVAL', message: 'CIV activity: no reference interval for cultured skin fibroblasts' },
    ]);
  });

  it('a first-order k against a linear-rate interval, and the reverse: BASIS_MISMATCH, no position', () => {
    const k = compareValue({ assay: 'CIV', measure: 'activity', value: 0.8, basis: 'first_order_k' }, interval({ assay: 'CIV' }), muscleAt(8));
    expect(k.flags.map((f) => f.code)).toEqual(['BASIS_MISMATCH']);
    expect(k.flags[0]!.message).toBe(
      'CIV activity: a first-order rate constant is never compared with an interval built from linear rates (Larkspur Row invented set)',
    );
    expect(k.position).toBeNull();
    const linear = compareValue({ assay: 'CIV', measure: 'activity', value: 80 }, interval({ assay: 'CIV', basis: 'first_order_k' }), muscleAt(8));
    expect(linear.flags[0]!.message).toBe(
      'CIV activity: a linear rate is never compared with an interval built from first-order rate constants (Larkspur Row invented set)',
    );
  });

  it('measure labels: X/CS, X/CII and "X activity"', () => {
    expect(measureLabel('CIII', 'ratio_cs')).toBe('CIII/CS');
    expect(measureLabel('CIII', 'ratio_cii')).toBe('CIII/CII');
    expect(measureLabel('CIII', 'activity')).toBe('CIII activity');
  });
});

describe('criteria bands at their edges', () => {
  // Bernier FP et al., Neurology 2002;59:1406–1411 [from memory] (docs/domain.md §2): tissue major < 20%,
  // minor 20–30%; cell line major < 30%, minor 30–40%; "below" is strict.
  it('tissue: 19.999 major, 20 minor, 20.001 minor; 29.999 minor, 30 and 30.001 not met', () => {
    expect(criteriaBand(19.999, 'skeletal_muscle')).toBe('major');
    expect(criteriaBand(20, 'skeletal_muscle')).toBe('minor');
    expect(criteriaBand(20.001, 'skeletal_muscle')).toBe('minor');
    expect(criteriaBand(29.999, 'skeletal_muscle')).toBe('minor');
    expect(criteriaBand(30, 'skeletal_muscle')).toBe('not_met');
    expect(criteriaBand(30.001, 'skeletal_muscle')).toBe('not_met');
  });

  it('cell line: 29.999 major, 30 minor; 39.999 minor, 40 not met', () => {
    expect(criteriaBand(29.999, 'lymphoblasts')).toBe('major');
    expect(criteriaBand(30, 'lymphoblasts')).toBe('minor');
    expect(criteriaBand(39.999, 'fibroblasts')).toBe('minor');
    expect(criteriaBand(40, 'fibroblasts')).toBe('not_met');
  });

  it('compareValue bands only the measure the rule set applies to and never citrate synthase', () => {
    // 19.5% of the CI/CS mean: major by the tissue rule; CI activity at 19.5%: no band (default applies to X/CS).
    const ratio = compareValue(
      { assay: 'CI', measure: 'ratio_cs', value: 0.039 },
      interval({ assay: 'CI', measure: 'ratio_cs', lower: 0.1, upper: 0.3, mean: 0.2, sd: 0.05, unit: 'ratio' }),
      muscleAt(8),
    );
    expect(ratio.percentOfMean).toBeCloseTo(19.5, 10);
    expect(ratio.band).toBe('major');
    const activity = compareValue({ assay: 'CI', measure: 'activity', value: 29.25 }, interval({ assay: 'CI' }), muscleAt(8));
    expect(activity.percentOfMean).toBeCloseTo(19.5, 10);
    expect(activity.band).toBeNull();
    const byActivity = { ...defaultDiagnosticCriteria, appliesTo: 'activity' as const };
    expect(compareValue({ assay: 'CI', measure: 'activity', value: 29.25 }, interval({ assay: 'CI' }), muscleAt(8), byActivity).band).toBe('major');
    expect(compareValue({ assay: 'CS', measure: 'activity', value: 29.25 }, interval(), muscleAt(8), byActivity).band).toBeNull();
  });
});

describe('replicate CV limit', () => {
  // CV% = 100 · SD / |mean| [common practice]; flagged when ABOVE the laboratory's limit. 90, 100, 110: mean 100,
  // sample SD exactly 10 [analytic: (100 + 0 + 100)/2 = 100], so the CV is exactly 10%.
  it('checks the worked values against simple-statistics', () => {
    const s = summariseReplicates([90, 100, 110], 50);
    expect(s.mean).toBe(mean([90, 100, 110]));
    expect(s.sd).toBeCloseTo(sampleStandardDeviation([90, 100, 110]), 12);
    expect(s.cvPct).toBe(10);
  });

  it('exactly at the limit no flag; limit just below the CV flags it; just above does not', () => {
    expect(summariseReplicates([90, 100, 110], 10).flags).toEqual([]);
    expect(summariseReplicates([90, 100, 110], 9.99).flags).toEqual([
      { code: 'HIGH_CV', message: 'Replicate CV 10% is above the laboratory limit of 9.99%' },
    ]);
    expect(summariseReplicates([90, 100, 110], 10.001).flags).toEqual([]);
  });

  it('a negative mean uses its magnitude; a zero mean gives no CV and no flag', () => {
    const negative = summariseReplicates([-90, -100, -110], 5);
    expect(negative.cvPct).toBe(10);
    expect(negative.flags.map((f) => f.code)).toEqual(['HIGH_CV']);
    const zero = summariseReplicates([-1, 1], 5);
    expect(zero.mean).toBe(0);
    expect(zero.sd).toBeCloseTo(Math.SQRT2, 12);
    expect(zero.cvPct).toBeNull();
    expect(zero.flags).toEqual([]);
  });

  it('missing replicates are skipped in the SD as well as the mean', () => {
    // 90, –, 110: mean 100, SD √((100 + 100)/1) = 14.142 [analytic]; undefined counts as missing too.
    const s = summariseReplicates([90, null, 110, undefined as unknown as null], 50);
    expect(s.n).toBe(2);
    expect(s.sd).toBeCloseTo(sampleStandardDeviation([90, 110]), 12);
    expect(s.flags.map((f) => f.message)).toEqual([
      'replicate 2 has no value and is left out',
      'replicate 4 has no value and is left out',
    ]);
  });

  it('no value at all: MISSING_VALUE "No replicate has a value"; a NaN stops with NON_FINITE naming it', () => {
    const none = summariseReplicates([null, null], 10);
    expect(none).toEqual({
      n: 0,
      mean: null,
      sd: null,
      cvPct: null,
      flags: [
        { code: 'MISSING_VALUE', message: 'replicate 1 has no value and is left out' },
        { code: 'MISSING_VALUE', message: 'replicate 2 has no value and is left out' },
        { code: 'MISSING_VALUE', message: 'No replicate has a value' },
      ],
    });
    const nan = summariseReplicates([1, 2, Number.NaN, 4], 10);
    expect(nan.n).toBe(0);
    expect(nan.flags).toEqual([{ code: 'NON_FINITE', message: 'replicate 3 is not a finite number' }]);
  });

  it('one value: its mean, no SD, SINGLE_REPLICATE', () => {
    const s = summariseReplicates([null, 42], 10);
    expect(s.mean).toBe(42);
    expect(s.n).toBe(1);
    expect(s.flags.map((f) => f.code)).toEqual(['MISSING_VALUE', 'SINGLE_REPLICATE']);
    expect(s.flags[1]!.message).toBe('Only one replicate has a value: no SD or CV');
  });
});

describe('firstNonFinite: the path of the first NaN or infinity', () => {
  it('names the path through objects and arrays, or null when all numbers are finite', () => {
    expect(firstNonFinite({ a: 1, b: [1, 2, { c: 3 }], d: null, e: 'text' })).toBeNull();
    expect(firstNonFinite({ a: 1, b: [1, 2, { c: Number.NaN }] })).toBe('b[2].c');
    expect(firstNonFinite({ fitTotal: { slopePerMin: Number.POSITIVE_INFINITY } })).toBe('fitTotal.slopePerMin');
    expect(firstNonFinite([0, Number.NEGATIVE_INFINITY])).toBe('[1]');
    expect(firstNonFinite(Number.NaN)).toBe('(value)');
    expect(firstNonFinite(Number.NaN, 'activity')).toBe('activity');
    expect(firstNonFinite(5)).toBeNull();
  });

  it('the first in order wins', () => {
    expect(firstNonFinite({ x: [1, Number.NaN], y: Number.NaN })).toBe('x[1]');
    expect(firstNonFinite([{ a: 1 }, { a: Number.NaN }, Number.NaN])).toBe('[1].a');
  });
});

describe('replicate SD far from zero', () => {
  it('shifting every value leaves the SD unchanged: 10⁹ + (0, 0, 1) has the SD of 0, 0, 1, 1/√3 [analytic]', () => {
    // The mean 10⁹ + 1/3 cannot be held exactly, so this also checks that the deviations are squared as
    // deviations (a sum of v² − mean² would lose everything to rounding here).
    const s = summariseReplicates([1e9, 1e9, 1e9 + 1], 50);
    expect(s.sd).toBeCloseTo(1 / Math.sqrt(3), 6);
    expect(sampleStandardDeviation([0, 0, 1])).toBeCloseTo(1 / Math.sqrt(3), 12);
  });
});
