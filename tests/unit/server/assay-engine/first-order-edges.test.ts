import { describe, expect, it } from 'vitest';
import { defaultAssayDefinitions, type AssayDefinition, type Trace } from '@/schemas/assay';
import { calculateFirstOrder } from '../../../../server/domain/assay-engine/first-order';

/*
 * The first-order rate constant against analytic decays. For A(t) = A∞ + (A₀ − A∞)·e^(−k·t), ln|A − A∞| falls on
 * a straight line of slope −k whichever side of A∞ the trace starts [analytic]; the apparent constant of a total
 * with an inhibitor-insensitive part is the sum of the two pseudo-first-order constants, so the specific constant
 * is k_total − k_background (Wharton & Tzagoloff, Methods Enzymol 1967 [from memory]; first-order kinetics of
 * cytochrome c oxidation, Clin Sci 2016;130:393–407 [confirmed]). k per mg/mL of protein in the reaction:
 * 20 µL of 2 mg/mL in 1000 µL is 0.04 mg/mL [derived].
 */
const civ: AssayDefinition = {
  ...defaultAssayDefinitions.find((d) => d.code === 'CIV')!,
  rateModel: 'first_order',
  version: 2,
};
const volumes = { reactionVolumeUl: 1000, sampleVolumeUl: 20, proteinMgPerMl: 2 };

/** A∞ + (A₀ − A∞)·e^(−k t), every dt seconds, k per minute. */
function decay(a0: number, aInf: number, kPerMin: number, n = 60, dt = 5): Trace {
  return Array.from({ length: n }, (_, i) => ({ t: i * dt, a: aInf + (a0 - aInf) * Math.exp((-kPerMin * i * dt) / 60) }));
}
const codes = (r: { flags: { code: string }[] }) => r.flags.map((f) => f.code);

describe('background subtraction', () => {
  it('k = k_total − k_background: 0.8 − 0.1 = 0.7 /min, 17.5 per mg/mL', () => {
    const r = calculateFirstOrder(
      { total: decay(0.95, 0.15, 0.8), background: decay(0.95, 0.15, 0.1), aInfinity: 0.15, ...volumes },
      civ,
    );
    expect(r.kTotalPerMin).toBeCloseTo(0.8, 9);
    expect(r.kBackgroundPerMin).toBeCloseTo(0.1, 9);
    expect(r.kPerMin).toBeCloseTo(0.7, 9);
    expect(r.kPerMg).toBeCloseTo(0.7 / 0.04, 7);
    expect(r.r2).toBeCloseTo(1, 9);
    expect(r.aInfinity).toBe(0.15);
    expect(r.window).toEqual({ fromS: 0, toS: 295 });
    expect(r.flags).toEqual([]);
  });

  it('the background is fitted over the total’s window, not its own automatic one', () => {
    // The background is a clean decay at 0.1/min up to 100 s and then drops to an implausible level: over the
    // total's window (stopped at 100 s by a reading at A∞) only its clean part counts.
    const total = decay(0.95, 0.15, 0.8, 30);
    total[21] = { t: total[21]!.t, a: 0.15 };
    const background = decay(0.95, 0.15, 0.1, 30).map((p) => (p.t > 100 ? { t: p.t, a: 0.16 } : p));
    const r = calculateFirstOrder({ total, background, aInfinity: 0.15, ...volumes }, civ);
    expect(r.window).toEqual({ fromS: 0, toS: 100 });
    expect(r.kBackgroundPerMin).toBeCloseTo(0.1, 9);
    expect(r.kPerMin).toBeCloseTo(0.7, 9);
  });

  it('a background that cannot be fitted leaves no k, though the total’s is shown', () => {
    const background = decay(0.95, 0.15, 0.1);
    background[3] = { t: background[3]!.t, a: Number.NaN };
    const r = calculateFirstOrder({ total: decay(0.95, 0.15, 0.8), background, aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMin).toBeNull();
    expect(r.kPerMg).toBeNull();
    expect(r.kTotalPerMin).toBeCloseTo(0.8, 9);
    expect(r.kBackgroundPerMin).toBeNull();
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'background trace, reading 4: the absorbance is not a finite number (NaN)' },
    ]);
  });

  it('a background equal to the total leaves k = 0, which is not positive: WRONG_SIGN and no k per mg', () => {
    const t = decay(0.95, 0.15, 0.8);
    const r = calculateFirstOrder({ total: t, background: t, aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMin).toBe(0);
    expect(r.kPerMg).toBeNull();
    expect(r.flags).toEqual([
      { code: 'WRONG_SIGN', message: 'first-order rate constant 0 min⁻¹ is not positive: ln|A − A∞| did not fall with time' },
    ]);
  });
});

describe('either side of A∞', () => {
  it('a trace rising towards A∞ (A below it) gives the same k: ln|A − A∞| still falls', () => {
    const r = calculateFirstOrder({ total: decay(0.2, 0.9, 0.5), aInfinity: 0.9, ...volumes }, civ);
    expect(r.kPerMin).toBeCloseTo(0.5, 9);
    expect(r.kPerMg).toBeCloseTo(0.5 / 0.04, 7);
  });
});

describe('readings at or past A∞', () => {
  it('a first reading exactly at A∞ has no logarithm: named, no k, even with the automatic window', () => {
    const t = decay(0.95, 0.15, 0.8);
    t[0] = { t: 0, a: 0.15 };
    const r = calculateFirstOrder({ total: t, aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMin).toBeNull();
    expect(r.kTotalPerMin).toBeNull();
    expect(r.r2).toBeNull();
    expect(r.window).toBeNull();
    expect(r.flags).toEqual([
      {
        code: 'PAST_END_POINT',
        message: 'total trace, reading 1 (t = 0 s): absorbance 0.15 is at or past the end-point absorbance A∞ = 0.15, so ln|A − A∞| is undefined',
      },
    ]);
  });

  it('a manual window is taken as given: only its readings count and its first reading is named by its place in the trace', () => {
    const t = decay(0.95, 0.15, 0.8);
    // Outside the window: ignored.
    t[0] = { t: 0, a: 0.1 };
    const ok = calculateFirstOrder({ total: t, aInfinity: 0.15, window: { fromS: 50, toS: 150 }, ...volumes }, civ);
    expect(ok.kPerMin).toBeCloseTo(0.8, 9);
    expect(ok.window).toEqual({ fromS: 50, toS: 150 });
    expect(ok.flags).toEqual([]);
    // A reading past A∞ inside a manual window refuses the window (the automatic one would stop before it).
    t[12] = { t: 60, a: 0.14 };
    const bad = calculateFirstOrder({ total: t, aInfinity: 0.15, window: { fromS: 50, toS: 150 }, ...volumes }, civ);
    expect(bad.kPerMin).toBeNull();
    expect(bad.flags.map((f) => f.message)).toEqual([
      'total trace, reading 13 (t = 60 s): absorbance 0.14 is at or past the end-point absorbance A∞ = 0.15, so ln|A − A∞| is undefined',
    ]);
  });

  it('an automatic window ends at the last reading before A∞ is reached, and k over it is exact', () => {
    const t = decay(0.95, 0.15, 0.8);
    t[31] = { t: t[31]!.t, a: 0.149 };
    const r = calculateFirstOrder({ total: t, aInfinity: 0.15, ...volumes }, civ);
    expect(r.window).toEqual({ fromS: 0, toS: 150 });
    expect(r.kPerMin).toBeCloseTo(0.8, 9);
    expect(r.flags).toEqual([]);
  });
});

describe('other refusals and checks', () => {
  it('an A∞ that is not a number is refused by name', () => {
    const r = calculateFirstOrder({ total: decay(0.95, 0.15, 0.8), aInfinity: Number.NaN, ...volumes }, civ);
    expect(r.kPerMin).toBeNull();
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: 'aInfinity is not a finite number (NaN)' }]);
  });

  it('a raw reading above the photometer range inside the window is flagged once; the logarithms themselves are not', () => {
    // Starts at 2.3 A and 2.1 A (both above 2): one flag, for the first.
    const r = calculateFirstOrder({ total: decay(2.3, 0.15, 0.8), aInfinity: 0.15, ...volumes }, civ);
    expect(r.kPerMin).toBeCloseTo(0.8, 9);
    expect(r.flags).toEqual([
      {
        code: 'OUT_OF_LINEAR_RANGE',
        message: 'total trace, reading 1 (t = 0 s): absorbance 2.3 is outside the linear range 0–2',
      },
    ]);
  });

  it('a raw reading above the range before a manual window is not flagged', () => {
    const r = calculateFirstOrder(
      { total: decay(2.3, 0.15, 0.8), aInfinity: 0.15, window: { fromS: 60, toS: 200 }, ...volumes },
      civ,
    );
    expect(r.flags).toEqual([]);
  });

  it('a raw reading below the range inside the window is flagged too', () => {
    const r = calculateFirstOrder({ total: decay(0.5, -0.2, 0.8), aInfinity: -0.2, ...volumes }, civ);
    expect(codes(r)).toEqual(['OUT_OF_LINEAR_RANGE']);
    expect(r.kPerMin).toBeCloseTo(0.8, 9);
  });

  it('a single stray reading is not screened on the log trace (residuals of logarithms are not absorbances)', () => {
    const t = decay(0.95, 0.15, 0.8);
    t[10] = { t: t[10]!.t, a: t[10]!.a + 0.01 };
    const r = calculateFirstOrder({ total: t, aInfinity: 0.15, window: { fromS: 0, toS: 150 }, ...volumes }, civ);
    expect(codes(r)).not.toContain('OUTLIER_READING');
    expect(r.kPerMin).not.toBeNull();
  });

  it('a manual window of 4 readings is fitted and flagged below the laboratory minimum, naming its times', () => {
    const r = calculateFirstOrder({ total: decay(0.95, 0.15, 0.8), aInfinity: 0.15, window: { fromS: 0, toS: 15 }, ...volumes }, civ);
    expect(r.kPerMin).toBeCloseTo(0.8, 9);
    expect(r.flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 4 readings between 0 and 15 s, fewer than the laboratory minimum of 5' },
    ]);
  });

  it('a manual window of 2 readings gives no k, and says so', () => {
    const r = calculateFirstOrder({ total: decay(0.95, 0.15, 0.8), aInfinity: 0.15, window: { fromS: 0, toS: 5 }, ...volumes }, civ);
    expect(r.kPerMin).toBeNull();
    expect(r.flags).toEqual([
      { code: 'TOO_FEW_POINTS', message: 'total trace has 2 readings; at least 3 are needed for a slope' },
    ]);
  });

  it('an opening lag is stepped over by the automatic window: k is the decay’s, the lag named', () => {
    // Held at 0.95 for 30 s, then the decay at 0.8/min from there [analytic]: the straight log stretch starts at 30 s.
    const t = decay(0.95, 0.15, 0.8).map((p) => (p.t <= 30 ? { t: p.t, a: 0.95 } : { t: p.t, a: 0.15 + 0.8 * Math.exp((-0.8 * (p.t - 30)) / 60) }));
    const r = calculateFirstOrder({ total: t, aInfinity: 0.15, ...volumes }, civ);
    // Within the automatic window's allowance of 0.5% of the fastest rate (linearity.ts).
    expect(Math.abs(r.kPerMin! - 0.8)).toBeLessThan(0.005 * 0.8);
    expect(r.window!.fromS).toBeGreaterThanOrEqual(25);
    expect(codes(r)).toEqual(['LAG_EXCLUDED']);
  });

  it('readings past the photometer range after the window are not flagged; the window’s last reading is', () => {
    // Rising towards A∞ = 2.4: A = 2.4 − 1.9·e^(−0.8t): 1.9897 at 115 s, 2.0161 at 120 s (reading 25) [analytic].
    const rising = decay(0.5, 2.4, 0.8);
    const before = calculateFirstOrder({ total: rising, aInfinity: 2.4, window: { fromS: 0, toS: 115 }, ...volumes }, civ);
    expect(codes(before)).not.toContain('OUT_OF_LINEAR_RANGE');
    const at = calculateFirstOrder({ total: rising, aInfinity: 2.4, window: { fromS: 0, toS: 120 }, ...volumes }, civ);
    expect(at.flags.find((f) => f.code === 'OUT_OF_LINEAR_RANGE')!.message).toMatch(/^total trace, reading 25 \(t = 120 s\): absorbance 2\.016 is outside/);
  });

  it('raw readings exactly at 0 A or 2 A are inside the photometer range', () => {
    const top = decay(2, 0.15, 0.8);
    expect(codes(calculateFirstOrder({ total: top, aInfinity: 0.15, ...volumes }, civ))).not.toContain('OUT_OF_LINEAR_RANGE');
    const low = decay(0.5, -0.5, 0.8).map((p) => (p.t === 50 ? { t: 50, a: 0 } : p));
    const r = calculateFirstOrder({ total: low, aInfinity: -0.5, window: { fromS: 0, toS: 50 }, ...volumes }, civ);
    expect(codes(r)).not.toContain('OUT_OF_LINEAR_RANGE');
    // Just below 0 is outside.
    low[10] = { t: 50, a: -0.0001 };
    expect(codes(calculateFirstOrder({ total: low, aInfinity: -0.5, window: { fromS: 0, toS: 50 }, ...volumes }, civ))).toContain('OUT_OF_LINEAR_RANGE');
  });

  it('the total is judged for curvature; the background is not', () => {
    // A straight fall (not first order): ln(A − A∞) bends, so a wide manual window is curved [analytic].
    const straight = Array.from({ length: 60 }, (_, i) => ({ t: i * 5, a: 0.95 - 0.0025 * i * 5 }));
    const total = calculateFirstOrder({ total: straight, aInfinity: 0.15, window: { fromS: 0, toS: 250 }, ...volumes }, civ);
    expect(total.flags.find((f) => f.code === 'CURVATURE')!.message).toMatch(/^total trace/);
    const bg = calculateFirstOrder(
      { total: decay(0.95, 0.15, 0.8), background: straight, aInfinity: 0.15, window: { fromS: 0, toS: 250 }, ...volumes },
      civ,
    );
    expect(codes(bg)).not.toContain('CURVATURE');
  });
});
