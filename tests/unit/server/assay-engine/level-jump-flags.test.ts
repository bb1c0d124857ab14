import { describe, expect, it } from 'vitest';
import type { Flag, TracePoint } from '@/schemas/assay';
import { levelJump } from '../../../../server/domain/assay-engine/level-jump';
import { fitTrace, type RateSettings } from '../../../../server/domain/assay-engine/rates';
import { labRateSettings } from './fixtures';

/*
 * The words of LEVEL_JUMP and JUMP_AVOIDED, and which side of a jump the automatic window keeps (rates.ts). The truths
 * are analytic: for readings x_i = i·h (i = 0 … n − 1) on a line of slope b, with every reading from i = k on moved by
 * d, the least-squares slope is b + d·Σ_{i≥k}(x_i − x̄)/Sxx with Sxx = h²·n(n² − 1)/12 [derived by hand from the
 * normal equations]; two parallel lines, one before k and one after, fit such readings exactly, with slope b and gap d.
 */
const codes = (flags: Flag[]) => flags.map((f) => f.code);

/** n readings every `stepS` seconds on 1.2 + b·t, every reading from index k on moved by d. */
const jumped = (n: number, stepS: number, perMin: number, k: number, d: number): TracePoint[] =>
  Array.from({ length: n }, (_, i) => ({ t: i * stepS, a: 1.2 + (perMin * i * stepS) / 60 + (i >= k ? d : 0) }));

/** As `jumped`, but flat until reading `lagN` (a lag), then falling at perMin. */
const lagged = (n: number, stepS: number, perMin: number, lagN: number, k: number, d: number): TracePoint[] =>
  Array.from({ length: n }, (_, i) => ({ t: i * stepS, a: 1.2 + (perMin * Math.max(0, i - lagN) * stepS) / 60 + (i >= k ? d : 0) }));

/** The instrument's reading noise stood in for by a deterministic ±0.002 ripple. */
const ripple = (trace: TracePoint[]) => trace.map((p, i) => ({ ...p, a: p.a + 0.002 * Math.sin(i * 2.1) }));

function fit(trace: TracePoint[], choice: Parameters<typeof fitTrace>[3] = { kind: 'auto' }, settings: RateSettings = labRateSettings) {
  const flags: Flag[] = [];
  const line = fitTrace(trace, 'total', settings, choice, { checkR2: true }, flags);
  return { line, flags, flag: (code: Flag['code']) => flags.find((f) => f.code === code) };
}

describe('the words of a jump: up, and against the direction of the fall', () => {
  // A line falling 0.06/min read every 5 s, 0.01 HIGHER from 50 s on (k = 10); over 0–80 s (n = 17, h = 1/12 min):
  // x̄ = 8, Σ_{i≥10}(i − 8) = 2 + … + 8 = 35, Sxx = h²·17·288/12 = h²·408, so the line's slope is
  // −0.06 + 0.01·35·12/408 = −0.06 + 0.0102941 = −0.0497059 per minute: (0.0497059 − 0.06)/0.06 = −17.157%, the line
  // runs 17.2% SLOWER than the rate either side, −0.06 [derived by hand as above].
  it('LEVEL_JUMP on a window set by hand: "higher", "slower", and the numbers worked by hand', () => {
    const { line, flag } = fit(jumped(37, 5, -0.06, 10, 0.01), { kind: 'manual', window: { fromS: 0, toS: 80 } });
    expect(line!.slopePerMin).toBeCloseTo(-0.0497059, 6);
    expect(flag('LEVEL_JUMP')!.message).toBe(
      "total trace between 0 and 80 s: from 50 s on the readings sit 0.01 higher than the line of those before (a jump: a bubble that stays, a knock, a lid), so the straight line's rate is 17.2% slower than the rate on either side, -0.06 per minute (limit 5%); set the window on one side of the jump, or repeat the reading",
    );
    expect(flag('LEVEL_JUMP')!.values!.changePct!).toBeCloseTo(-17.157, 2);
  });

  it('JUMP_AVOIDED on the automatic window: "higher", "slower", and the side before the jump kept', () => {
    // The same 17 readings (0–80 s) with no lag allowed (lagMaxS 0: only the first reading may start a window). Before
    // the jump: 0–45 s, ten readings; from it on: 50–80 s, seven. The longer side, before, is kept, at the true −0.06.
    const { line, flags } = fit(jumped(17, 5, -0.06, 10, 0.01), { kind: 'auto' }, { ...labRateSettings, lagMaxS: 0 });
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(line).toMatchObject({ fromS: 0, toS: 45, points: 10 });
    expect(line!.slopePerMin).toBeCloseTo(-0.06, 9);
    expect(flags[0]!.message).toBe(
      'total trace: from 50 s on the readings sit 0.01 higher (a jump: a bubble that stays, a knock, a lid), which would make the straight line over 0–80 s run 17.2% slower than the rate on either side; the window is kept to 0–45 s, before the jump, the longer straight stretch on one side of it',
    );
    expect(flags[0]!.values).toMatchObject({ t: 50, fromS: 0, toS: 45 });
  });
});

describe('only the trace the rate is read from, in absorbance, is checked for a jump', () => {
  // The same window with its jump up at 50 s (LEVEL_JUMP above). docs/domain.md § 5a: the check is for "every window of
  // the trace the rate is read from"; a background or blank trace (checkR2 off) shares the total's window and is not
  // judged, and a log-transformed trace (checkOutliers off, first-order.ts) is not in absorbance, so the noise floor the
  // jump is judged against does not apply to it.
  const trace = jumped(37, 5, -0.06, 10, 0.01);
  const window = { kind: 'manual', window: { fromS: 0, toS: 80 } } as const;

  it('a background trace: not judged, so no jump is named', () => {
    const flags: Flag[] = [];
    const line = fitTrace(trace, 'background', labRateSettings, window, { checkR2: false }, flags);
    expect(line!.slopePerMin).toBeCloseTo(-0.0497059, 6);
    expect(codes(flags)).toEqual([]);
  });

  it('a trace fitted without the outlier checks (a log-transformed one): its r² is judged, no jump is named', () => {
    // The jump lowers r² below 0.99 (LOW_R2, the one flag). In steps, with s_i = 1 from reading 10 on (7 of 17):
    // SSE = d²·(Σ(s − s̄)² − (Σ(i − 8)s)²/Sxx) = 1e-4·(7·10/17 − 35²/408) = 1.1152e-4, and
    // Syy = b²·408 + 2bd·35 + d²·70/17 with b = −0.005 per step = 0.0102 − 0.0035 + 0.00041176 = 0.0071118, so
    // r² = 1 − 1.1152e-4/0.0071118 = 0.9843 [derived by hand from the normal equations].
    const flags: Flag[] = [];
    fitTrace(trace, 'total', labRateSettings, window, { checkR2: true, checkOutliers: false }, flags);
    expect(codes(flags)).toEqual(['LOW_R2']);
    expect(flags[0]!.values!.r2!).toBeCloseTo(0.9843, 4);
  });
});

describe('a curved window is flagged curved, not for a jump', () => {
  it('a noise-free fall of 0.06/min read every 5 s for 180 s, 0.02 lower from 90 s, set by hand over 0–180 s: CURVATURE only', () => {
    // The jump is there (n = 37, k = 18: the line runs 13.95% faster than −0.06, level-jump.test.ts), but the window's
    // middle third (readings 12–23, the jump after its sixth) runs faster than its outer thirds: over 12 readings
    // Σ_{j≥6}(j − 5.5) = 18 and Sxx = 12·143/12 = 143 (in steps), so the middle third falls 0.02·18/143 = 0.0025175 per
    // step more, 0.0302 per minute: −0.0902 against −0.06 at the ends, (0.06 − 0.0902)/0.0902 = −33.5% [derived by
    // hand]. A window flagged curved is not also named for a jump.
    const trace = jumped(37, 5, -0.06, 18, -0.02);
    expect(levelJump(trace, 0, 36, labRateSettings)).toMatchObject({ index: 18, t: 90 });
    const { flags } = fit(trace, { kind: 'manual', window: { fromS: 0, toS: 180 } });
    expect(codes(flags)).toEqual(['CURVATURE']);
    expect(flags[0]!.message).toMatch(/^total trace between 0 and 180 s is curved: the straight line's rate is 33\.5% below/);
  });
});

describe('which side of a jump the automatic window keeps', () => {
  it('two sides of equal length: the earlier is kept, and a side of exactly the minimum count is enough', () => {
    // 10 readings every 10 s falling 0.06/min, 0.02 lower from 50 s (k = 5). The search gives 0–80 s (n = 9,
    // h = 1/6 min): Σ_{i≥5}(i − 4) = 10, Sxx = h²·9·80/12 = h²·60, so the line falls 0.06 + 0.02·10·6/60 = 0.08 per
    // minute, (0.08 − 0.06)/0.08 = 25% faster [derived by hand]. Before the jump: 0–40 s, five readings (the
    // laboratory minimum exactly); from it on: 50–90 s, also five. Of equal lengths, the earlier.
    const { line, flags } = fit(jumped(10, 10, -0.06, 5, -0.02));
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(line).toMatchObject({ fromS: 0, toS: 40, points: 5 });
    expect(flags[0]!.message).toBe(
      'total trace: from 50 s on the readings sit 0.02 lower (a jump: a bubble that stays, a knock, a lid), which would make the straight line over 0–80 s run 25% faster than the rate on either side; the window is kept to 0–40 s, before the jump, the longer straight stretch on one side of it',
    );
  });

  it('neither side long enough (a laboratory minimum of 8): the window is not cut, and is flagged LEVEL_JUMP instead', () => {
    // 15 readings every 10 s, flat to 30 s (a lag), then falling 0.06/min, 0.01 lower from 90 s (k = 9). The search
    // gives 30–130 s (readings 3–13, found after the lag). Before the jump, 30–80 s: six readings; from it on, 90–140 s:
    // six, too few for any window of eight. Neither side is taken; the window keeps the jump and says so. Over
    // 30–130 s (n = 11, h = 1/6 min): Σ_{j≥6}(j − 5) = 15, Sxx = h²·11·120/12 = h²·110, so the line falls
    // 0.06 + 0.01·15·6/110 = 0.0681818 per minute, (0.0681818 − 0.06)/0.0681818 = 12.0% faster [derived by hand].
    const { line, flags, flag } = fit(lagged(15, 10, -0.06, 3, 9, -0.01), { kind: 'auto' }, { ...labRateSettings, minPoints: 8 });
    expect(codes(flags)).toEqual(['LAG_EXCLUDED', 'LEVEL_JUMP']);
    expect(line).toMatchObject({ fromS: 30, toS: 130, points: 11 });
    expect(line!.slopePerMin).toBeCloseTo(-0.0681818, 6);
    expect(flag('LEVEL_JUMP')!.message).toMatch(/^total trace between 30 and 130 s: from 90 s on the readings sit 0\.01 lower .* rate is 12% faster than the rate on either side, -0\.06 per minute/);
  });
});

describe('a lag before a window kept to one side of a jump', () => {
  it('the side kept is before the jump and starts where the lag ends: the lag is named', () => {
    // Flat to 30 s, then falling 0.1/min, read every 5 s for 200 s with the ±0.002 ripple, 0.015 lower from 150 s.
    // The window found starts after the opening readings (LAG_EXCLUDED) and holds the jump; its side before the jump
    // is the longer and keeps the window's start, so the readings left out at the start are still named.
    const { flags, flag } = fit(ripple(lagged(41, 5, -0.1, 6, 30, -0.015)));
    expect(codes(flags)).toEqual(['LAG_EXCLUDED', 'JUMP_AVOIDED']);
    expect(flag('JUMP_AVOIDED')!.values!.t).toBe(150);
    expect(flag('JUMP_AVOIDED')!.values!.toS!).toBeLessThan(150);
    expect(flag('JUMP_AVOIDED')!.values!.fromS).toBe(flag('LAG_EXCLUDED')!.values!.toS);
    expect(flag('JUMP_AVOIDED')!.message).toMatch(/, before the jump, /);
  });

  it('the side kept starts at the jump: the readings before the window are not a lag of it, and are not named', () => {
    // Flat to 30 s, then falling 0.1/min read every 5 s, no noise, 0.015 lower from 80 s. The search gives 50–100 s
    // (it starts after the first reading); the side from the jump on, 80–200 s, is kept, so what was left out before
    // 50 s is not the opening of the window kept.
    const { line, flags } = fit(lagged(41, 5, -0.1, 6, 16, -0.015));
    expect(codes(flags)).toEqual(['JUMP_AVOIDED']);
    expect(flags[0]!.message).toMatch(/over 50–100 s .* kept to 80–200 s, after the jump/);
    expect(line).toMatchObject({ fromS: 80, toS: 200, points: 25 });
    expect(line!.slopePerMin).toBeCloseTo(-0.1, 9);
  });
});
