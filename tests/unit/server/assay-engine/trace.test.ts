import { describe, expect, it } from 'vitest';
import type { Flag, TracePoint } from '@/schemas/assay';
import {
  checkLinearRange,
  checkTrace,
  fmt,
  indexRange,
  sameTrace,
} from '../../../../server/domain/assay-engine/trace';

/*
 * The reading checks every slope depends on. Rules: a bad reading is named by its 1-based position and what is
 * wrong with it (house rule: bad input gets an error naming the field and row [common practice]); times strictly
 * increase, at least 1 ms apart (no photometer reads faster [our choice, documented in trace.ts]); a window's ends
 * are both inclusive (the API contract of `window`, docs/api.md).
 */
const tr = (...pairs: [number, number][]): TracePoint[] => pairs.map(([t, a]) => ({ t, a }));

describe('fmt (numbers in flag messages)', () => {
  it('4 significant digits by default, trailing zeros dropped; other precisions on request', () => {
    expect(fmt(0.123456)).toBe('0.1235');
    expect(fmt(1234.56)).toBe('1235');
    expect(fmt(2)).toBe('2');
    expect(fmt(0.123456, 2)).toBe('0.12');
  });
  it('non-finite numbers are written out, not formatted', () => {
    expect(fmt(Number.NaN)).toBe('NaN');
    expect(fmt(Number.NEGATIVE_INFINITY)).toBe('-Infinity');
  });
});

describe('checkTrace', () => {
  it('a clean trace passes with no flag', () => {
    const flags: Flag[] = [];
    expect(checkTrace(tr([0, 1], [10, 0.9], [20, 0.8]), 'total', flags)).toBe(true);
    expect(flags).toEqual([]);
  });

  it('a non-finite absorbance is named with its reading and value; a non-finite time as the time', () => {
    const flags: Flag[] = [];
    expect(checkTrace(tr([0, 1], [10, Number.NaN], [20, 0.8]), 'background', flags)).toBe(false);
    expect(flags).toEqual([
      { code: 'NON_FINITE', message: 'background trace, reading 2: the absorbance is not a finite number (NaN)' },
    ]);
    const f2: Flag[] = [];
    expect(checkTrace(tr([0, 1], [10, 0.9], [Number.POSITIVE_INFINITY, 0.8]), 'blank', f2)).toBe(false);
    expect(f2).toEqual([
      { code: 'NON_FINITE', message: 'blank trace, reading 3: the time is not a finite number (Infinity)' },
    ]);
  });

  it('a non-finite reading stops the check at once: later problems are not reported', () => {
    const flags: Flag[] = [];
    checkTrace(tr([0, Number.NaN], [0, Number.NaN]), 'total', flags);
    expect(flags.map((f) => f.code)).toEqual(['NON_FINITE']);
  });

  it('two order problems give one flag, for the first; the trace is refused', () => {
    const flags: Flag[] = [];
    expect(checkTrace(tr([0, 1], [10, 0.9], [5, 0.8], [30, 0.7], [30, 0.6]), 'total', flags)).toBe(false);
    expect(flags).toEqual([
      {
        code: 'TIME_NOT_INCREASING',
        message: 'total trace, reading 3: time 5 s is not after the previous reading (10 s); times must strictly increase',
      },
    ]);
  });

  it('an order problem followed by a non-finite reading reports both, and the trace is refused', () => {
    const flags: Flag[] = [];
    expect(checkTrace(tr([10, 1], [5, 0.9], [20, Number.NaN]), 'total', flags)).toBe(false);
    expect(flags.map((f) => f.code)).toEqual(['TIME_NOT_INCREASING', 'NON_FINITE']);
  });

  it('a decreasing time after a too-fast pair is still one flag (the first)', () => {
    const flags: Flag[] = [];
    checkTrace(tr([0, 1], [0.0005, 0.9], [-1, 0.8]), 'total', flags);
    expect(flags).toHaveLength(1);
    expect(flags[0]!.message).toMatch(/reading 2: time 0\.0005 s is less than 1 ms after/);
  });

  it('the first reading may have any finite time, negative included', () => {
    expect(checkTrace(tr([-30, 1], [-20, 0.9], [-10, 0.8]), 'total', [])).toBe(true);
  });
});

describe('indexRange (both ends inclusive)', () => {
  const t = tr([0, 1], [10, 1], [20, 1], [30, 1], [40, 1]);
  it('a window on reading times includes both', () => {
    expect(indexRange(t, { fromS: 10, toS: 30 })).toEqual({ lo: 1, hi: 3 });
  });
  it('a window between reading times takes the readings inside', () => {
    expect(indexRange(t, { fromS: 5, toS: 35 })).toEqual({ lo: 1, hi: 3 });
  });
  it('a window wider than the trace takes all of it', () => {
    expect(indexRange(t, { fromS: -100, toS: 100 })).toEqual({ lo: 0, hi: 4 });
  });
  it('a window after the last reading holds none (hi below lo)', () => {
    const r = indexRange(t, { fromS: 50, toS: 60 });
    expect(r.hi - r.lo + 1).toBe(0);
    expect(r.lo).toBe(5);
  });
  it('a window between two readings holds none', () => {
    const r = indexRange(t, { fromS: 11, toS: 19 });
    expect(r.hi - r.lo + 1).toBe(0);
  });
  it('a window before the first reading holds none', () => {
    const r = indexRange(t, { fromS: -20, toS: -10 });
    expect(r.hi - r.lo + 1).toBe(0);
  });
});

describe('checkLinearRange (the photometer’s linear range, both limits inside)', () => {
  const t = tr([0, 2.5], [10, 1.5], [20, 1.0], [30, -0.1], [40, 3]);
  it('only readings from lo to hi are looked at', () => {
    const flags: Flag[] = [];
    checkLinearRange(t, 1, 2, 0, 2, 'total', flags);
    expect(flags).toEqual([]);
  });
  it('the first reading outside is named, once, with the range', () => {
    const flags: Flag[] = [];
    checkLinearRange(t, 1, 4, 0, 2, 'background', flags);
    expect(flags).toEqual([
      {
        code: 'OUT_OF_LINEAR_RANGE',
        message: 'background trace, reading 4 (t = 30 s): absorbance -0.1 is outside the linear range 0–2',
      },
    ]);
  });
  it('the last reading of the window is looked at (hi inclusive), and a reading above the top is named', () => {
    const flags: Flag[] = [];
    checkLinearRange(t, 2, 4, -1, 2, 'total', flags);
    expect(flags.map((f) => f.message)).toEqual([
      'total trace, reading 5 (t = 40 s): absorbance 3 is outside the linear range -1–2',
    ]);
  });
  it('readings exactly on a limit are inside', () => {
    const flags: Flag[] = [];
    checkLinearRange(t, 0, 2, 1, 2.5, 'total', flags);
    expect(flags).toEqual([]);
  });
});

describe('sameTrace', () => {
  const a = tr([0, 1], [10, 0.9]);
  it('the same array, or an equal copy, is the same', () => {
    expect(sameTrace(a, a)).toBe(true);
    expect(sameTrace(a, tr([0, 1], [10, 0.9]))).toBe(true);
  });
  it('a different length, time or absorbance is not', () => {
    expect(sameTrace(a, tr([0, 1]))).toBe(false);
    expect(sameTrace(a, tr([0, 1], [11, 0.9]))).toBe(false);
    expect(sameTrace(a, tr([0, 1], [10, 0.91]))).toBe(false);
    expect(sameTrace(tr([0, 1], [10, 0.9]), tr([1, 1], [10, 0.9]))).toBe(false);
  });
});
