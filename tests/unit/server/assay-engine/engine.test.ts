import fc from 'fast-check';
import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  defaultAssayDefinitions,
  type AssayDefinition,
  type CalculationRequest,
  type FlagCode,
  type Trace,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { calculateActivity } from '../../../../server/domain/assay-engine/engine';

const def = (code: AssayCode): AssayDefinition => defaultAssayDefinitions.find((d) => d.code === code)!;

function line(a0: number, slopePerMin: number, n = 60, dt = 5, t0 = 0): Trace {
  return Array.from({ length: n }, (_, i) => ({ t: t0 + i * dt, a: a0 + (slopePerMin * i * dt) / 60 }));
}

/** Deterministic noise (mulberry32), so a failing case can be replayed. */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function noisy(trace: Trace, amplitude: number, seed: number): Trace {
  const r = rng(seed);
  return trace.map((p) => ({ t: p.t, a: p.a + (r() * 2 - 1) * amplitude }));
}

function request(assay: AssayCode, total: Trace, extra: Partial<CalculationRequest> = {}): CalculationRequest {
  return {
    assay,
    pathlengthCm: 1,
    reactionVolumeUl: 1000,
    sampleVolumeUl: 20,
    proteinMgPerMl: 2,
    total,
    ...extra,
  };
}

const codes = (r: { flags: { code: FlagCode }[] }) => r.flags.map((f) => f.code);

describe('slopes against simple-statistics', () => {
  it('when a noisy trace is fitted, then slope, r² and residual SD match an independent regression', () => {
    // Reference: simple-statistics linearRegression / rSquared (npm) [common practice]; residual SD
    // √(Σe²/(n−2)) computed here from simple-statistics' own fitted line.
    const total = noisy(line(0.6, 0.04), 0.003, 7);
    const result = calculateActivity(
      request('CIII', total, { window: { fromS: 0, toS: 295 }, background: line(0.6, 0.001) }),
      def('CIII'),
    );
    const data = total.map((p) => [p.t, p.a]);
    const lr = linearRegression(data);
    const f = linearRegressionLine(lr);
    const sse = data.reduce((s, [t, a]) => s + (a! - f(t!)) ** 2, 0);
    expect(result.slopeTotalPerMin).toBeCloseTo(lr.m * 60, 12);
    expect(result.r2).toBeCloseTo(rSquared(data, f), 12);
    expect(result.residualSd).toBeCloseTo(Math.sqrt(sse / (data.length - 2)), 12);
    expect(result.fitTotal?.aAtFrom).toBeCloseTo(f(0), 12);
  });

  it('when a trace has a known slope plus small noise, then that slope is recovered (property)', () => {
    // Least squares is unbiased; with |noise| ≤ 0.0005 over 295 s the slope error stays well below 0.001 /min
    // [common practice bound, checked against simple-statistics in the test above].
    fc.assert(
      fc.property(
        fc.double({ min: -0.3, max: 0.3, noNaN: true }),
        fc.array(fc.double({ min: -0.0005, max: 0.0005, noNaN: true }), { minLength: 60, maxLength: 60 }),
        (slope, noise) => {
          const total = line(1, slope).map((p, i) => ({ t: p.t, a: p.a + noise[i]! }));
          const r = calculateActivity(request('CS', total, { window: { fromS: 0, toS: 295 } }), def('CS'));
          expect(Math.abs(r.slopeTotalPerMin! - slope)).toBeLessThan(0.001);
        },
      ),
    );
  });

  it('when the background trace equals the total, then the specific slope is zero and flagged (property)', () => {
    // Specific rate = total − background, docs/domain.md §1 [confirmed consensus table legend].
    fc.assert(
      fc.property(
        fc.double({ min: -0.1, max: -0.001, noNaN: true }),
        fc.integer({ min: 1, max: 1000 }),
        (slope, seed) => {
          const total = noisy(line(0.8, slope), 0.0005, seed);
          const r = calculateActivity(request('CI', total, { background: total.map((p) => ({ ...p })) }), def('CI'));
          expect(r.specificSlopePerMin).toBe(0);
          expect(codes(r)).toContain('BACKGROUND_MATCHES_TOTAL');
          expect(codes(r)).toContain('NEAR_ZERO');
        },
      ),
    );
  });
});

describe('windows', () => {
  it('when the trace bends after 30 readings, then the automatic window stops at the bend', () => {
    // Definition of the automatic window in the issue: the longest early window whose r² passes the
    // lab threshold. A strict lab threshold (0.999) keeps the plateau out.
    const strict = { ...def('CS'), r2Threshold: 0.999 };
    const straight = line(0.2, 0.06, 30);
    const last = straight[straight.length - 1]!;
    const plateau = Array.from({ length: 30 }, (_, i) => ({ t: last.t + (i + 1) * 5, a: last.a + 0.0001 * (i + 1) }));
    const r = calculateActivity(request('CS', [...straight, ...plateau], { background: line(0.2, 0) }), strict);
    expect(r.windowAuto).toBe(true);
    // At most one plateau reading gets in before r² drops below 0.999.
    expect(r.window!.fromS).toBe(0);
    expect(r.window!.toS).toBeGreaterThanOrEqual(last.t);
    expect(r.window!.toS).toBeLessThanOrEqual(last.t + 5);
    expect(Math.abs(r.slopeTotalPerMin! - 0.06)).toBeLessThan(0.001);
    expect(r.flags).toEqual([]);
  });

  it('when no early window reaches the threshold, then the whole trace is fitted and r² is flagged', () => {
    const total = noisy(line(0.6, 0.002), 0.01, 11);
    const r = calculateActivity(request('CII+III', total), def('CII+III'));
    expect(r.window).toEqual({ fromS: 0, toS: 295 });
    expect(codes(r)).toContain('LOW_R2');
  });

  it('when a manual window is given, then both ends are inclusive and it applies to both traces', () => {
    // API contract (issue item 8): window both ends inclusive, applied to both traces.
    const total = line(0.9, -0.03);
    const background = line(0.9, -0.003);
    const r = calculateActivity(request('CI', total, { background, window: { fromS: 60, toS: 120 } }), def('CI'));
    expect(r.window).toEqual({ fromS: 60, toS: 120 });
    expect(r.windowAuto).toBe(false);
    expect(r.fitTotal?.points).toBe(13); // 60, 65, …, 120
    expect(r.fitBackground?.points).toBe(13);
    expect(r.fitBackground?.fromS).toBe(60);
    expect(r.fitBackground?.toS).toBe(120);
  });

  it('when a baseline is recorded before the substrate and the window is automatic, then the whole baseline is fitted', () => {
    // Consensus legend [confirmed]: (rate after the starting substrate) − (baseline).
    const baseline = line(0.1, 0.004, 24, 5, -120);
    const total = line(0.1, 0.05);
    const r = calculateActivity(request('CS', total, { background: baseline }), def('CS'));
    expect(r.fitBackground?.points).toBe(24);
    expect(r.slopeBackgroundPerMin).toBeCloseTo(0.004, 10);
    expect(r.specificSlopePerMin).toBeCloseTo(0.046, 10);
  });
});

// Source: the item 2 (blank slope subtracted where given); the cancellation is arithmetic [derived].
describe('blank', () => {
  it('when a blank is given without background, then its slope is subtracted from the total', () => {
    // Issue item 2: a blank (no-sample) slope subtracted where given.
    const r = calculateActivity(request('CIV', line(0.9, -0.06)), def('CIV'), { blank: line(0.9, -0.01) });
    expect(r.slopeBlankPerMin).toBeCloseTo(-0.01, 10);
    expect(r.specificSlopePerMin).toBeCloseTo(-0.05, 10);
  });

  it('when a blank and a background are both given, then the blank cancels: specific = total − background', () => {
    // (T − blank) − (B − blank) = T − B [derived].
    const r = calculateActivity(
      request('CI', line(0.9, -0.03), { background: line(0.9, -0.004) }),
      def('CI'),
      { blank: { slopePerMin: -0.002 } },
    );
    expect(r.specificSlopePerMin).toBeCloseTo(-0.026, 10);
  });
});

// Source for every check in this block: the item 2 (each problem gives a named flag and a reason,
// never a silent number) and docs/domain.md §1 ("a slope of the wrong sign for the assay is a flag, not a
// negative activity" [derived]); lab limits are the [common practice] defaults of the definitions.
describe('flags', () => {
  it('TOO_FEW_POINTS: when a window holds 2 readings, then no slope and the reason', () => {
    // Issue item 2: too few points give a named flag, never a silent number.
    const r = calculateActivity(request('CIV', line(0.9, -0.06), { window: { fromS: 10, toS: 15 } }), def('CIV'));
    expect(codes(r)).toContain('TOO_FEW_POINTS');
    expect(r.slopeTotalPerMin).toBeNull();
    expect(r.activity).toBeNull();
    expect(r.flags.find((f) => f.code === 'TOO_FEW_POINTS')!.message).toMatch(/total trace has 2 readings/);
  });

  it('TOO_FEW_POINTS: when a window holds fewer than the lab minimum, then a slope with a flag', () => {
    const r = calculateActivity(request('CIV', line(0.9, -0.06), { window: { fromS: 0, toS: 10 } }), def('CIV'));
    expect(codes(r)).toContain('TOO_FEW_POINTS');
    expect(r.slopeTotalPerMin).toBeCloseTo(-0.06, 10);
  });

  it('TIME_NOT_INCREASING: when two readings share a time, then no slope and the reading is named', () => {
    const total = line(0.9, -0.06);
    total[10] = { t: total[9]!.t, a: total[10]!.a };
    const r = calculateActivity(request('CIV', total), def('CIV'));
    expect(codes(r)).toEqual(['TIME_NOT_INCREASING']);
    expect(r.flags[0]!.message).toMatch(/reading 11/);
    expect(r.slopeTotalPerMin).toBeNull();
    expect(r.activity).toBeNull();
  });

  it('NON_FINITE: when an absorbance is NaN, then no slope and the reading is named', () => {
    const total = line(0.9, -0.06);
    total[4] = { t: total[4]!.t, a: Number.NaN };
    const r = calculateActivity(request('CIV', total), def('CIV'));
    expect(codes(r)).toEqual(['NON_FINITE']);
    expect(r.flags[0]!.message).toMatch(/reading 5/);
    expect(r.activity).toBeNull();
  });

  it('NON_FINITE: when the background has an infinite time, then there is no specific slope', () => {
    const background = line(0.9, -0.005);
    background[2] = { t: Number.POSITIVE_INFINITY, a: 0.9 };
    const r = calculateActivity(request('CI', line(0.9, -0.03), { background }), def('CI'));
    expect(codes(r)).toContain('NON_FINITE');
    expect(r.slopeTotalPerMin).toBeCloseTo(-0.03, 10);
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.activity).toBeNull();
  });

  it('LOW_R2: when the total trace is mostly noise, then r² under the threshold is flagged', () => {
    const total = noisy(line(0.6, 0.004), 0.01, 3);
    const r = calculateActivity(request('CII+III', total), def('CII+III'));
    expect(codes(r)).toContain('LOW_R2');
    expect(r.r2!).toBeLessThan(0.98);
  });

  it('OUT_OF_LINEAR_RANGE: when an absorbance is above the instrument range, then it is flagged', () => {
    const r = calculateActivity(request('CIV', line(2.3, -0.06)), def('CIV'));
    expect(codes(r)).toContain('OUT_OF_LINEAR_RANGE');
    expect(r.flags.find((f) => f.code === 'OUT_OF_LINEAR_RANGE')!.message).toMatch(/reading 1 .*2\.3/);
  });

  it('WRONG_SIGN: when a falling assay rises, then no activity is given', () => {
    // docs/domain.md §1: a slope of the wrong sign is a flag, not a negative activity.
    const r = calculateActivity(request('CI', line(0.5, 0.02), { background: line(0.5, 0) }), def('CI'));
    expect(codes(r)).toContain('WRONG_SIGN');
    expect(r.specificSlopePerMin).toBeCloseTo(0.02, 10);
    expect(r.activity).toBeNull();
  });

  it('WRONG_SIGN: when the background falls faster than the total, then no activity is given', () => {
    const r = calculateActivity(request('CI', line(0.9, -0.01), { background: line(0.9, -0.02) }), def('CI'));
    expect(codes(r)).toContain('WRONG_SIGN');
    expect(r.activity).toBeNull();
  });

  it('NEAR_ZERO: when the specific slope is under the lab limit, then the activity comes with a flag', () => {
    // Specific slope 0.0305 − 0.0300 = 0.0005 A/min (total minus rotenone, docs/domain.md §1 [confirmed]);
    // × the consensus CI factor 4032.3 [derived] ≈ 2.0 nmol/min/mg. The near-zero limit is the laboratory's own
    // per assay [common practice].
    const r = calculateActivity(request('CI', line(0.9, -0.0305), { background: line(0.9, -0.03) }), def('CI'));
    expect(codes(r)).toContain('NEAR_ZERO');
    expect(r.activity).toBeCloseTo(0.0005 * 4032.26, 2);
  });

  it('NO_BACKGROUND: when an inhibitor assay is sent without its background, then it says so', () => {
    const r = calculateActivity(request('CI', line(0.9, -0.03)), def('CI'));
    expect(codes(r)).toEqual(['NO_BACKGROUND']);
    expect(r.flags[0]!.message).toMatch(/rotenone/);
    expect(r.specificSlopePerMin).toBe(r.slopeTotalPerMin);
  });

  it('FIRST_ORDER_NOT_COMPUTED: when a first-order definition gets no A∞, then only the linear rate is given', () => {
    const civ = { ...def('CIV'), rateModel: 'first_order' as const, version: 2 };
    const r = calculateActivity(request('CIV', line(0.9, -0.06)), civ);
    expect(codes(r)).toEqual(['FIRST_ORDER_NOT_COMPUTED']);
    expect(r.firstOrder).toBeNull();
    expect(r.definitionVersion).toBe(2);
  });

  it('when the definition is for another assay, then the error names the assay', () => {
    expect(() => calculateActivity(request('CI', line(0.9, -0.03)), def('CS'))).toThrow(/assay/);
  });
});
