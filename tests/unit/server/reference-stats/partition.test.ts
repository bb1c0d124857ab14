import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import { checkPartition, summarizeGroup } from '../../../../server/domain/reference-stats/partition';

// Harris EK & Boyd JC, Clin Chem 1990;36:265–270 [confirmed]: z = |x̄₁ − x̄₂| / √(s₁²/n₁ + s₂²/n₂),
// partition when z > 3·√((n₁ + n₂)/240); SD ratio > 1.5 also partitions [from memory].

describe('checkPartition', () => {
  it('on a hand-worked example partitions because the means differ', () => {
    // n₁ = 60, x̄₁ = 100, s₁ = 20; n₂ = 80, x̄₂ = 112, s₂ = 25.
    // s₁²/n₁ = 400/60 = 6.6667; s₂²/n₂ = 625/80 = 7.8125; sum 14.4792; √ = 3.8052; z = 12/3.8052 = 3.1536.
    // critical = 3·√(140/240) = 3·√0.58333 = 3 × 0.76376 = 2.2913. z > critical → partition.
    // SD ratio 25/20 = 1.25 ≤ 1.5.
    const r = checkPartition(
      { label: 'under 5 y', n: 60, mean: 100, sd: 20 },
      { label: '5 y and over', n: 80, mean: 112, sd: 25 },
    );
    expect(r.z).toBeCloseTo(3.1536, 3);
    expect(r.zCritical).toBeCloseTo(2.2913, 3);
    expect(r.sdRatio).toBeCloseTo(1.25, 12);
    expect(r.decision).toBe('partition');
    expect(r.reason).toMatch(/means differ/);
    expect(r.reason).not.toMatch(/SD of/);
  });

  it('on a hand-worked example combines when neither rule fires', () => {
    // n = 120 each, means 100 and 103, SD 15 each: SE = √(225/120 × 2) = √3.75 = 1.9365; z = 3/1.9365 = 1.5492;
    // critical = 3·√(240/240) = 3. SD ratio 1.
    const r = checkPartition(
      { label: 'A', n: 120, mean: 100, sd: 15 },
      { label: 'B', n: 120, mean: 103, sd: 15 },
    );
    expect(r.z).toBeCloseTo(1.5492, 3);
    expect(r.zCritical).toBeCloseTo(3, 12);
    expect(r.decision).toBe('combine');
  });

  it('on a hand-worked example partitions on the SD ratio alone', () => {
    // n = 100 each, means 50 and 50.5, SDs 10 and 16: SE = √(1 + 2.56) = 1.8868; z = 0.265;
    // critical = 3·√(200/240) = 2.7386; SD ratio 1.6 > 1.5 → partition.
    const r = checkPartition(
      { label: 'girls', n: 100, mean: 50, sd: 10 },
      { label: 'boys', n: 100, mean: 50.5, sd: 16 },
    );
    expect(r.z).toBeCloseTo(0.265, 3);
    expect(r.zCritical).toBeCloseTo(2.7386, 3);
    expect(r.sdRatio).toBeCloseTo(1.6, 12);
    expect(r.decision).toBe('partition');
    expect(r.reason).toMatch(/SD of "boys" is 1\.60 times/);
  });

  it('rejects a group with zero spread, naming that group', () => {
    try {
      checkPartition({ label: 'A', n: 10, mean: 5, sd: 1 }, { label: 'B', n: 10, mean: 5, sd: 0 });
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ReferenceStatsInputError);
      expect((error as ReferenceStatsInputError).field).toBe('b.sd');
    }
  });
});

describe('checkPartition at its boundaries', () => {
  // Harris & Boyd 1990 [confirmed]: partition when z EXCEEDS 3·√((n₁+n₂)/240). With n₁ + n₂ = 240 the critical
  // value is exactly 3; n 144 / SD 6 and n 96 / SD 24 give SE² = 36/144 + 576/96 = 6.25, SE = 2.5 exactly
  // [derived by hand], so a mean difference of 7.5 is z = 3 exactly. (SD ratio limit raised to isolate z.)
  const a = { label: 'a', n: 144, mean: 0, sd: 6 };
  const b = { label: 'b', n: 96, mean: 7.5, sd: 24 };

  it('when z equals the critical value exactly, then the groups are combined', () => {
    const r = checkPartition(a, b, { sdRatioLimit: 10 });
    expect(r.z).toBe(3);
    expect(r.zCritical).toBe(3);
    expect(r.decision).toBe('combine');
  });

  it('when z is just above the critical value, then they are partitioned', () => {
    expect(checkPartition(a, { ...b, mean: 7.5001 }, { sdRatioLimit: 10 }).decision).toBe('partition');
  });

  it('when one SD is exactly 1.5 times the other, then that alone does not partition; just above, it does', () => {
    // The SD rule is "more than 1.5 times" [from memory]; 3 / 2 is exactly 1.5 in binary floating point.
    const same = { label: 'x', n: 120, mean: 10, sd: 2 };
    expect(checkPartition(same, { ...same, label: 'y', sd: 3 }).decision).toBe('combine');
    expect(checkPartition(same, { ...same, label: 'y', sd: 3.0001 }).decision).toBe('partition');
  });
});

describe('summarizeGroup', () => {
  it('matches simple-statistics mean and sampleStandardDeviation', () => {
    const values = [12.1, 14.8, 9.7, 11.2, 13.3, 10.9];
    const g = summarizeGroup('band', values);
    expect(g.n).toBe(6);
    expect(g.mean).toBeCloseTo(ss.mean(values), 12);
    expect(g.sd).toBeCloseTo(ss.sampleStandardDeviation(values), 12);
  });

  it('rejects a group of one value', () => {
    expect(() => summarizeGroup('infants', [3])).toThrow(/"infants" needs at least 2 values/);
  });
});

describe('checkPartition: refusals name the group and field, reasons name the wider group', () => {
  // Bad input gets a clear error naming the field [house rule]; both Harris & Boyd statistics need n ≥ 2, a
  // finite mean and an SD above 0 per group [analytic: the standard error is undefined otherwise].
  const ok = { label: 'ok', n: 30, mean: 10, sd: 2 };
  const refusal = (a: typeof ok, b: typeof ok) => {
    try {
      checkPartition(a, b);
    } catch (error) {
      expect(error).toBeInstanceOf(ReferenceStatsInputError);
      return { field: (error as ReferenceStatsInputError).field, message: (error as Error).message };
    }
    throw new Error('expected a refusal');
  };

  it('n of 1 refused, n of 2 accepted; a fractional n refused', () => {
    expect(refusal({ ...ok, label: 'infants', n: 1 }, ok)).toEqual({ field: 'a.n', message: 'Group "infants" needs at least 2 values' });
    expect(refusal(ok, { ...ok, label: 'teens', n: 2.5 })).toEqual({ field: 'b.n', message: 'Group "teens" needs at least 2 values' });
    expect(checkPartition({ ...ok, n: 2 }, { ...ok, n: 2 }).decision).toBe('combine');
  });

  it('a non-finite mean refused on that group', () => {
    expect(refusal(ok, { ...ok, label: 'adults', mean: Number.NaN })).toEqual({
      field: 'b.mean',
      message: 'Group "adults" has no finite mean',
    });
    expect(refusal({ ...ok, mean: Number.POSITIVE_INFINITY }, ok).field).toBe('a.mean');
  });

  it('an SD of 0, below 0 or not finite refused on that group', () => {
    expect(refusal({ ...ok, label: 'flat', sd: 0 }, ok)).toEqual({
      field: 'a.sd',
      message: 'Group "flat" needs an SD above 0 (are all its values identical?)',
    });
    expect(refusal(ok, { ...ok, sd: -1 }).field).toBe('b.sd');
    expect(refusal(ok, { ...ok, sd: Number.NaN }).field).toBe('b.sd');
    expect(refusal({ ...ok, sd: Number.POSITIVE_INFINITY }, ok).field).toBe('a.sd');
  });

  it('when the first group is the wider one, the reason names it; both reasons are joined', () => {
    // z = 0.5/√(256/100 + 100/100) = 0.265; SD ratio 16/10 = 1.6 > 1.5 [from memory].
    const r = checkPartition({ label: 'boys', n: 100, mean: 50.5, sd: 16 }, { label: 'girls', n: 100, mean: 50, sd: 10 });
    expect(r.reason).toBe('Separate intervals: the SD of "boys" is 1.60 times the other (limit 1.5).');
    // Means 100 and 112 as in the first worked example, and SDs 20 and 32: z = 12/√(400/60 + 1024/80) = 2.72 >
    // 2.29, SD ratio 1.6 > 1.5 — both rules fire.
    const both = checkPartition({ label: 'a', n: 60, mean: 100, sd: 20 }, { label: 'b', n: 80, mean: 112, sd: 32 });
    expect(both.reason).toBe(
      'Separate intervals: the means differ: z = 2.72 exceeds the critical 2.29; the SD of "b" is 1.60 times the other (limit 1.5).',
    );
  });

  it('a combine decision explains both statistics against their limits', () => {
    // The second worked example above: z = 1.5492, critical 3, SD ratio 1.
    const r = checkPartition({ label: 'A', n: 120, mean: 100, sd: 15 }, { label: 'B', n: 120, mean: 103, sd: 15 });
    expect(r.reason).toBe('One interval: z = 1.55 is within the critical 3.00 and the SD ratio 1.00 is within 1.5.');
    expect(r.sdRatioLimit).toBe(1.5);
    expect(r.groups.map((g) => g.label)).toEqual(['A', 'B']);
  });

  it('summarizeGroup names its field and refuses a non-finite value', () => {
    try {
      summarizeGroup('infants', [1, Number.NaN]);
      expect.unreachable();
    } catch (error) {
      expect((error as ReferenceStatsInputError).field).toBe('groups.infants');
    }
    try {
      summarizeGroup('infants', []);
      expect.unreachable();
    } catch (error) {
      expect((error as ReferenceStatsInputError).field).toBe('groups.infants');
      expect((error as Error).message).toBe('Group "infants" needs at least 2 values; got 0');
    }
    // Two equal values: SD 0 [analytic], returned as 0 (checkPartition then refuses it).
    expect(summarizeGroup('pair', [4, 4]).sd).toBe(0);
  });
});
