import { describe, expect, it } from 'vitest';
import { ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';
import { verifyInterval } from '../../../../server/domain/reference-stats/verification';

// CLSI EP28-A3c: 20 local values [confirmed]; accept when ≤ 2 fall outside, otherwise test 20 more
// [from memory]. For other set sizes the same 10% applies (4 of 40) [derived from 2/20].

/** `inside` values within [10, 20] (limits included), then `below` values under 10 and `above` over 20. */
function localValues(inside: number, below: number, above: number): number[] {
  const values: number[] = [];
  for (let i = 0; i < inside; i++) values.push(10 + (10 * i) / Math.max(1, inside - 1));
  for (let i = 0; i < below; i++) values.push(9.99 - i);
  for (let i = 0; i < above; i++) values.push(20.01 + i);
  return values;
}

describe('verifyInterval', () => {
  it('when 2 of 20 fall outside, then the interval is verified, with the limits themselves counted inside', () => {
    const values = localValues(18, 1, 1);
    expect(values).toContain(10);
    expect(values).toContain(20);
    const r = verifyInterval({ lower: 10, upper: 20, values });
    expect(r.firstRound).toEqual({ n: 20, below: 1, above: 1, outside: 2, allowedOutside: 2, passed: true });
    expect(r.decision).toBe('verified');
    expect(r.secondRound).toBeNull();
  });

  it('when 3 of 20 fall outside, then it advises testing 20 more', () => {
    const r = verifyInterval({ lower: 10, upper: 20, values: localValues(17, 0, 3) });
    expect(r.firstRound.outside).toBe(3);
    expect(r.firstRound.above).toBe(3);
    expect(r.decision).toBe('test_more');
    expect(r.message).toMatch(/Test 20 more/);
  });

  it('when the first set failed and a second set of 20 has at most 2 outside, then it is verified on that set', () => {
    const r = verifyInterval({
      lower: 10,
      upper: 20,
      values: localValues(15, 2, 3),
      additionalValues: localValues(18, 2, 0),
    });
    expect(r.firstRound.outside).toBe(5);
    expect(r.secondRound).toEqual({ n: 20, below: 2, above: 0, outside: 2, allowedOutside: 2, passed: true });
    expect(r.decision).toBe('verified');
  });

  it('when both sets have 3 or more outside, then it is not verified', () => {
    const r = verifyInterval({
      lower: 10,
      upper: 20,
      values: localValues(17, 3, 0),
      additionalValues: localValues(17, 1, 2),
    });
    expect(r.decision).toBe('not_verified');
    expect(r.secondRound?.outside).toBe(3);
  });

  it('when 40 values are tested in one set, then up to 4 may fall outside [derived: 10%]', () => {
    expect(verifyInterval({ lower: 10, upper: 20, values: localValues(36, 2, 2) }).decision).toBe('verified');
    const r = verifyInterval({ lower: 10, upper: 20, values: localValues(35, 2, 3) });
    expect(r.firstRound.allowedOutside).toBe(4);
    expect(r.decision).toBe('test_more');
  });

  it('when fewer than 20 values are given, then it names the field at fault', () => {
    const fieldOf = (fn: () => unknown) => {
      try {
        fn();
      } catch (error) {
        return error instanceof ReferenceStatsInputError ? error.field : 'other error';
      }
      return 'no error';
    };
    expect(fieldOf(() => verifyInterval({ lower: 10, upper: 20, values: localValues(19, 0, 0) }))).toBe('values');
    expect(
      fieldOf(() =>
        verifyInterval({ lower: 10, upper: 20, values: localValues(17, 3, 0), additionalValues: [12, 13] }),
      ),
    ).toBe('additionalValues');
    expect(fieldOf(() => verifyInterval({ lower: 20, upper: 10, values: localValues(20, 0, 0) }))).toBe('upper');
  });
});
