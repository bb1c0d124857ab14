import { describe, expect, it } from 'vitest';
import type { Flag, FlagCode, TracePoint } from '@/schemas/assay';
import { fitTrace } from '../../../../server/domain/assay-engine/rates';
import { labRateSettings } from './fixtures';

/*
 * fitTrace, the slope behind every activity, against analytic truths:
 * - a straight line A = a₀ + s·t has slope s everywhere, r² 1 and no residual [analytic];
 * - for a parabola A = a + b·x + c·x² read at evenly spaced x from 0 to X, the least-squares straight line has the
 *   parabola's slope at the middle, b + c·X, while the quadratic fit gives the starting rate b exactly, so the
 *   straight line's error against the initial rate is 100·(|b + cX| − |b|)/max(|b|, |b + cX|) % [derived by hand;
 *   the symmetric points make the odd moments about the middle vanish];
 * - a reading lifted by d off a noise-free line lies d/floor SDs off (the others' SD is 0, floored at the reading
 *   noise) [analytic; externally studentised residual, Belsley, Kuh & Welsch 1980, from memory].
 * The settings are the default laboratory settings of src/schemas/assay.ts.
 */
const settings = labRateSettings;

const codes = (flags: Flag[]): FlagCode[] => flags.map((f) => f.code);
/** Readings every `step` s from 0, A = f(minutes). */
const sample = (n: number, step: number, f: (x: number) => number): TracePoint[] =>
  Array.from({ length: n }, (_, i) => ({ t: i * step, a: f((i * step) / 60) }));
/** A = 1.2 − 0.012·x (x in minutes): 0.0002 A per second. */
const straight = sample(12, 10, (x) => 1.2 - 0.012 * x);

describe('the fitted line', () => {
  it('over a manual window: slope −0.012/min, both ends on the line, r² 1, five points', () => {
    const flags: Flag[] = [];
    const line = fitTrace(straight, 'total', settings, { kind: 'manual', window: { fromS: 20, toS: 60 } }, { checkR2: true }, flags)!;
    expect(flags).toEqual([]);
    expect(line.fromS).toBe(20);
    expect(line.toS).toBe(60);
    expect(line.slopePerMin).toBeCloseTo(-0.012, 12);
    expect(line.aAtFrom).toBeCloseTo(1.2 - 0.0002 * 20, 12);
    expect(line.aAtTo).toBeCloseTo(1.2 - 0.0002 * 60, 12);
    expect(line.r2).toBeCloseTo(1, 12);
    expect(line.residualSd).toBeCloseTo(0, 12);
    expect(line.points).toBe(5);
  });

  it('over the whole trace (kind all): from the first to the last reading', () => {
    const line = fitTrace(straight, 'background', settings, { kind: 'all' }, { checkR2: false }, [])!;
    expect(line.fromS).toBe(0);
    expect(line.toS).toBe(110);
    expect(line.points).toBe(12);
  });
});

describe('too few readings', () => {
  const run = (trace: TracePoint[], choice: Parameters<typeof fitTrace>[3] = { kind: 'auto' }) => {
    const flags: Flag[] = [];
    const line = fitTrace(trace, 'total', settings, choice, { checkR2: true }, flags);
    return { line, flags };
  };

  it('a trace of 2, 1 or 0 readings gives no slope and says how many (singular for one)', () => {
    expect(run(straight.slice(0, 2)).flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 2 readings; at least 3 are needed for a slope' },
    ]);
    expect(run(straight.slice(0, 1)).flags[0]!.message).toBe('total trace has 1 reading; at least 3 are needed for a slope');
    expect(run([]).flags[0]!.message).toBe('total trace has 0 readings; at least 3 are needed for a slope');
    expect(run(straight.slice(0, 2)).line).toBeNull();
  });

  it('a manual window holding 1 or 0 readings is named by its times', () => {
    const one = run(straight, { kind: 'manual', window: { fromS: 10, toS: 15 } });
    expect(one.line).toBeNull();
    expect(one.flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 1 reading between 10 and 15 s; at least 3 are needed for a slope' },
    ]);
    const none = run(straight, { kind: 'manual', window: { fromS: 11, toS: 19 } });
    expect(none.flags[0]!.message).toBe('total trace has 0 readings between 11 and 19 s; at least 3 are needed for a slope');
  });

  it('a manual window of exactly 3 readings gives a slope (flagged below the laboratory minimum of 5)', () => {
    const r = run(straight, { kind: 'manual', window: { fromS: 0, toS: 20 } });
    expect(r.line!.points).toBe(3);
    expect(r.flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 3 readings between 0 and 20 s, fewer than the laboratory minimum of 5' },
    ]);
  });

  it('an automatic window on a trace shorter than the minimum fits all of it, flagged "in the trace"', () => {
    const r = run(straight.slice(0, 4));
    expect(r.line!.points).toBe(4);
    expect(r.flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 4 readings in the trace, fewer than the laboratory minimum of 5' },
    ]);
  });
});

describe('r² below the threshold', () => {
  // Alternating ±0.01 around a slow line: r² far below 0.99.
  const zigzag = sample(8, 10, (x) => 1 - 0.001 * x).map((p, i) => ({ t: p.t, a: p.a + (i % 2 ? 0.01 : -0.01) }));
  it('is flagged on the total with the r², the window and the threshold', () => {
    const flags: Flag[] = [];
    const line = fitTrace(zigzag, 'total', settings, { kind: 'all' }, { checkR2: true, checkOutliers: false }, flags)!;
    const f = flags.find((x) => x.code === 'LOW_R2')!;
    expect(f.values).toEqual({ r2: line.r2, threshold: 0.99 });
    expect(f.message).toMatch(/^total trace: r² [\d.]+ over 0–70 s is below the threshold 0\.99: the readings scatter/);
  });
  it('is not judged on a background or blank (checkR2 off)', () => {
    const flags: Flag[] = [];
    fitTrace(zigzag, 'background', settings, { kind: 'all' }, { checkR2: false, checkOutliers: false }, flags);
    expect(flags).toEqual([]);
  });
});

describe('curvature of a chosen window (checked from 4 readings; the automatic window is straight by construction)', () => {
  // A = 1 − 0.1x + 0.01x² at x = 0, 1, 2, 3 min: start rate −0.1, line −0.1 + 0.03 = −0.07 → −30% [derived].
  const slowing = sample(4, 60, (x) => 1 - 0.1 * x + 0.01 * x * x);
  // A = 0.5 + 0.02x + 0.01x²: start rate 0.02, line 0.05 → +60% [derived].
  const speeding = sample(4, 60, (x) => 0.5 + 0.02 * x + 0.01 * x * x);

  it('a window that slows by 30% is flagged as curved, with the loss and the limit', () => {
    const flags: Flag[] = [];
    fitTrace(slowing, 'total', settings, { kind: 'all' }, { checkR2: true }, flags);
    const f = flags.find((x) => x.code === 'CURVATURE')!;
    expect(f.values!.changePct).toBeCloseTo(-30, 9);
    expect(f.values!.limitPct).toBe(5);
    expect(f.message).toBe(
      "total trace between 0 and 180 s is curved: the straight line's rate is 30% below the rate at the window's start (limit 5%), so the activity is underestimated; a shorter, earlier window or a diluted sample gives the initial rate",
    );
  });

  it('a window that speeds up by 60% is flagged as after a lag', () => {
    const flags: Flag[] = [];
    fitTrace(speeding, 'total', settings, { kind: 'manual', window: { fromS: 0, toS: 180 } }, { checkR2: true }, flags);
    const f = flags.find((x) => x.code === 'CURVATURE')!;
    expect(f.values!.changePct).toBeCloseTo(60, 9);
    expect(f.message).toBe(
      "total trace between 0 and 180 s speeds up: the rate at the window's start is 60% slower than the straight line's (limit 5%), as after a lag; start the window later",
    );
  });

  it('three readings of the same curve are not judged (too few to tell a bend from noise)', () => {
    const flags: Flag[] = [];
    fitTrace(slowing.slice(0, 3), 'total', settings, { kind: 'all' }, { checkR2: true }, flags);
    expect(codes(flags)).not.toContain('CURVATURE');
  });

  it('a background is never judged for curvature', () => {
    const flags: Flag[] = [];
    fitTrace(slowing, 'background', settings, { kind: 'all' }, { checkR2: false }, flags);
    expect(codes(flags)).not.toContain('CURVATURE');
  });
});

describe('a stray reading', () => {
  const bumped = (d: number) => straight.map((p, i) => (i === 4 ? { t: p.t, a: p.a + d } : p));
  it('0.05 A above a noise-free line is named: reading 5, t 40 s, 25 SDs (0.05/0.002), limit 4', () => {
    const flags: Flag[] = [];
    fitTrace(bumped(0.05), 'total', settings, { kind: 'all' }, { checkR2: false }, flags);
    const f = flags.find((x) => x.code === 'OUTLIER_READING')!;
    expect(f.values!.reading).toBe(5);
    expect(f.values!.t).toBe(40);
    expect(f.values!.sds).toBeCloseTo(25, 6);
    expect(f.values!.limitSd).toBe(4);
    expect(f.message).toBe(
      'total trace, reading 5 (t = 40 s): absorbance 1.242 lies 0.05 above the line through the other readings, 25 times their scatter (limit 4): look for a bubble or a knock, and move the window or repeat the reading',
    );
  });
  it('a dip is said to lie below the line', () => {
    const flags: Flag[] = [];
    fitTrace(bumped(-0.05), 'total', settings, { kind: 'all' }, { checkR2: false }, flags);
    expect(flags.find((x) => x.code === 'OUTLIER_READING')!.message).toMatch(/lies 0\.05 below the line/);
  });
  it('is not looked for when outliers are switched off (log traces)', () => {
    const flags: Flag[] = [];
    fitTrace(bumped(0.05), 'total', settings, { kind: 'all' }, { checkR2: false, checkOutliers: false }, flags);
    expect(flags).toEqual([]);
  });
});

describe('the linear range is checked inside the fitted window only', () => {
  const t = straight.map((p, i) => (i === 0 ? { t: p.t, a: 2.5 } : p));
  it('a reading above 2 A before the window is not flagged; inside it is', () => {
    const outside: Flag[] = [];
    fitTrace(t, 'total', settings, { kind: 'manual', window: { fromS: 10, toS: 110 } }, { checkR2: false }, outside);
    expect(codes(outside)).toEqual([]);
    const inside: Flag[] = [];
    fitTrace(t, 'total', settings, { kind: 'all' }, { checkR2: false, checkOutliers: false }, inside);
    expect(codes(inside)).toEqual(['OUT_OF_LINEAR_RANGE']);
  });
});

describe('the automatic window', () => {
  it('a strongly curved trace has no straight window: NO_LINEAR_WINDOW over the first five readings, −13.3%', () => {
    // A = 1 − 0.1x + 0.02x² every 10 s for 100 s; the first five readings span x = 0–2/3 min: line slope
    // −0.1 + 0.02·(2/3) = −0.08667 against the start rate −0.1 → −13.33% [derived]. Noise-free, so the bend is
    // significant in every window.
    const curved = sample(11, 10, (x) => 1 - 0.1 * x + 0.02 * x * x);
    const flags: Flag[] = [];
    expect(fitTrace(curved, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)).toBeNull();
    expect(flags).toHaveLength(1);
    const f = flags[0]!;
    expect(f.code).toBe('NO_LINEAR_WINDOW');
    expect(f.values!.changePct).toBeCloseTo(-40 / 3, 6);
    expect(f.values).toMatchObject({ limitPct: 5, fromS: 0, toS: 40 });
    expect(f.message).toBe(
      'total trace: no stretch of 5 or more readings is straight, so no initial rate can be read — across the first 5 readings (0–40 s) the rate already falls by 13.3% (limit 5%). No activity is given: dilute the sample or read more often, or set a window by hand (it will be flagged)',
    );
  });

  it('a trace that speeds up throughout says the rate rises', () => {
    const flags: Flag[] = [];
    fitTrace(sample(11, 10, (x) => 0.2 + 0.1 * x + 0.02 * x * x), 'total', settings, { kind: 'auto' }, { checkR2: true }, flags);
    expect(flags[0]!.message).toMatch(/the rate already rises by/);
  });

  it('a flat start of 3 readings then a line: the lag is stepped over and named on the total only', () => {
    // Flat at 0.3 until 20 s, then rising 0.06/min: the rate is the line's [analytic].
    const lag = Array.from({ length: 16 }, (_, i) => ({ t: i * 10, a: i <= 2 ? 0.3 : 0.3 + 0.001 * (i - 2) * 10 }));
    const flags: Flag[] = [];
    const line = fitTrace(lag, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)!;
    expect(line.slopePerMin).toBeCloseTo(0.06, 9);
    const f = flags.find((x) => x.code === 'LAG_EXCLUDED')!;
    expect(f.values).toMatchObject({ readings: line.fromS / 10, toS: line.fromS });
    expect(f.message).toMatch(new RegExp(`^total trace: the first ${line.fromS / 10} readings \\(before ${line.fromS} s\\) were left out`));
    const bg: Flag[] = [];
    fitTrace(lag, 'background', settings, { kind: 'auto' }, { checkR2: false }, bg);
    expect(codes(bg)).not.toContain('LAG_EXCLUDED');
  });

  it('a trace of exactly the minimum of 5 readings is searched, not fitted whole: a curved one has no straight window', () => {
    const flags: Flag[] = [];
    expect(fitTrace(sample(5, 60, (x) => 1 - 0.1 * x + 0.01 * x * x), 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)).toBeNull();
    expect(codes(flags)).toEqual(['NO_LINEAR_WINDOW']);
  });

  it('a curved trace shorter than the minimum is fitted whole and flagged for its length and its curvature', () => {
    const flags: Flag[] = [];
    const line = fitTrace(sample(4, 60, (x) => 1 - 0.1 * x + 0.01 * x * x), 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)!;
    expect(line.points).toBe(4);
    expect(codes(flags)).toEqual(['TOO_FEW_POINTS', 'LOW_R2', 'CURVATURE']);
  });

  it('a trace of exactly 3 readings gives a slope (3 are enough), flagged below the laboratory minimum', () => {
    const flags: Flag[] = [];
    const line = fitTrace(straight.slice(0, 3), 'total', settings, { kind: 'all' }, { checkR2: true }, flags)!;
    expect(line.slopePerMin).toBeCloseTo(-0.012, 12);
    expect(codes(flags)).toEqual(['TOO_FEW_POINTS']);
  });

  it('a lag of one reading is named in the singular', () => {
    // Flat for the first two readings (0 and 10 s), then rising 0.06/min from 10 s: one reading before the line.
    const lag = Array.from({ length: 16 }, (_, i) => ({ t: i * 10, a: i <= 1 ? 0.3 : 0.3 + 0.001 * (i - 1) * 10 }));
    const flags: Flag[] = [];
    fitTrace(lag, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags);
    expect(flags.find((x) => x.code === 'LAG_EXCLUDED')!.message).toMatch(/^total trace: the first 1 reading \(before 10 s\) were left out/);
  });
});

describe('a bubble in a slowing window', () => {
  // 60 s flat at 1.0, then A = 0.2 + 0.8·e^(−0.01·(t − 60)) read every 10 s to 300 s, +0.08 at 150 s: the trace of
  // the rate check that gave −0.199 per minute over 110–190 s, 59% below the initial rate 0.8 × 0.01 × 60 = 0.48
  // per minute [analytic: the derivative of a first-order decay at its start], with only lag, r² and outlier flags.
  const trace = Array.from({ length: 31 }, (_, i) => {
    const t = 10 * i;
    return { t, a: (t < 60 ? 1 : 0.2 + 0.8 * Math.exp(-0.01 * (t - 60))) + (t === 150 ? 0.08 : 0) };
  });

  it('the automatic window refuses, as on the same trace without the bubble', () => {
    const flags: Flag[] = [];
    expect(fitTrace(trace, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)).toBeNull();
    expect(codes(flags)).toEqual(['NO_LINEAR_WINDOW']);
    // The earliest five readings that slow down start just after the lag (the windows reaching back into the flat
    // lag speed up instead): at 70 s, since no window starts on the reading at 60 s, where the flat lag meets the
    // fall, |1 − (1 + 0.924)/2|/√1.5 = 0.031 off its neighbours' line, beyond 4 × 0.002 [by hand]. "The", not "the
    // first", since they are not the trace's first readings.
    expect(flags[0]!.message).toContain('across the 5 readings (70–110 s) the rate already falls');
  });

  it('the window 110–190 s set by hand is flagged curved, judged without the bubble, and the flag names that reading', () => {
    const flags: Flag[] = [];
    fitTrace(trace, 'total', settings, { kind: 'manual', window: { fromS: 110, toS: 190 } }, { checkR2: true }, flags);
    const curved = flags.find((f) => f.code === 'CURVATURE');
    // Without the bubble the eight readings 110–190 s run from the rate at 110 s, 0.48·e^(−0.5) = 0.291 per
    // minute, down to 0.48·e^(−1.3) = 0.131 [analytic]: far past the 5% limit.
    expect(curved?.message).toContain('reading 16 (t = 150 s)');
    expect(curved?.values?.changePct).toBeLessThan(-5);
    expect(codes(flags)).toContain('OUTLIER_READING');
  });
});

describe('a bubble near the start of a straight trace', () => {
  it('the automatic window moves past it and says so, naming the reading; no lag is claimed', () => {
    // A = 1.2 − 0.06·t/min read every 2 s for 180 s with a ±0.003 zig-zag, +0.12 at 2 s (reading 2). The readings
    // before the window run at the trace's own rate, so calling them a slow start would be false.
    const trace = Array.from({ length: 91 }, (_, i) => ({ t: 2 * i, a: 1.2 - (0.06 * 2 * i) / 60 + (i % 2 === 0 ? 0.003 : -0.003) + (i === 1 ? 0.12 : 0) }));
    const flags: Flag[] = [];
    const line = fitTrace(trace, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)!;
    expect(codes(flags)).toEqual(['STRAY_READING_AVOIDED']);
    expect(flags[0]!.message).toContain('reading 2 (t = 2 s) lies far off its neighbours');
    expect(flags[0]!.message).toContain(`starts at ${line.fromS} s rather than 0 s`);
    // The bubble is reading 2; the first start without it is the next reading, 4 s, so readings 1 and 2 are left out.
    expect(flags[0]!.message).toContain('leaving out 2 readings that ran at the same rate');
    expect(flags[0]!.values).toEqual({ reading: 2, t: 2, readings: 2, fromS: 0, toS: 4 });
    // The zig-zag moves the slope by at most 6·0.003/(n + 1) over the window's span [derived by hand for an
    // alternating ±e on evenly spaced readings]: far under 0.006 per minute for a window of a minute or more.
    expect(line.toS - line.fromS).toBeGreaterThanOrEqual(60);
    expect(Math.abs(line.slopePerMin + 0.06)).toBeLessThan(0.006);
  });
});

describe('the refusal names where the trace bends', () => {
  it('a decay bent from its first reading: "across the first 5 readings (0–40 s) the rate already falls by" about 15%', () => {
    // A = 0.6 + 0.7·e^(−0.5·t/min) every 10 s for 300 s. Over the first five readings (0–40 s, 2/3 min) the rate falls
    // to e^(−1/3) = 0.72 of its start, and the straight line runs at about the middle's rate, e^(−1/6) = 0.85: some
    // 15% below the start [derived by hand], far past the 5% limit, and every later window bends as much.
    const decay = sample(31, 10, (x) => 0.6 + 0.7 * Math.exp(-0.5 * x));
    const flags: Flag[] = [];
    expect(fitTrace(decay, 'total', settings, { kind: 'auto' }, { checkR2: true }, flags)).toBeNull();
    expect(codes(flags)).toEqual(['NO_LINEAR_WINDOW']);
    expect(flags[0]!.message).toMatch(/across the first 5 readings \(0–40 s\) the rate already falls by 1[3-7](\.\d+)?%/);
  });
});
