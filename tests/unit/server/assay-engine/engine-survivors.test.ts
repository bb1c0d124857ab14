import { describe, expect, it } from 'vitest';
import { calculationResultSchema, type Trace } from '@/schemas/assay';
import { calculateActivity, calculateActivityFromRates } from '../../../../server/domain/assay-engine/engine';
import { codes, cuvette, def, line } from './fixtures';

/*
 * Behaviour of calculateActivity / calculateActivityFromRates that earlier tests left open: which trace a flag
 * names, the background and blank still fitted when the total cannot be, a zero or negative activity factor, two
 * equal rates of 0, a share of a zero total, a typed total that is not a number, and the first-order paths.
 * Sources: activity = |ΔA/min| × V_r·1000 / (ε·l·V_s·protein) (Beer–Lambert, IUPAC Gold Book
 * doi:10.1351/goldbook.B00626 [confirmed]; docs/domain.md §1 [derived]); with ε 20 (set here), l 1 cm,
 * V_r 1000 µL, V_s 50 µL, 1 mg/mL the factor is 10⁶ / (20 × 50) = 1000 exactly [derived by hand]. The least-squares
 * slope of readings lying exactly on a line is that line's slope [analytic]. House rule (docs/testing.md): a flag
 * names the trace or field it is about. The result must meet the public contract, calculationResultSchema
 * (src/schemas/assay.ts), which fixes `basis` to 'linear_rate'.
 */
/** The same line with reading 3 (t = 20 s) unreadable. */
const withNaN = (trace: Trace): Trace => trace.map((p, i) => (i === 2 ? { t: p.t, a: Number.NaN } : p));

describe('a flag on the background or the blank names that trace (house rule: name the field)', () => {
  it('an unreadable background reading is reported as the background trace’s, not the total’s', () => {
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.06), background: withNaN(line(0.9, -0.012)) }, def('CI'));
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'background trace, reading 3: the absorbance is not a finite number (NaN)' },
    ]);
    expect(r.activity).toBeNull();
  });

  it('an unreadable blank reading is reported as the blank trace’s', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: withNaN(line(1, -0.01)) });
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'blank trace, reading 3: the absorbance is not a finite number (NaN)' },
    ]);
  });

  it('a scattered blank is not judged on r²: it is flat or small by design (rates.ts FitOptions), only the total is', () => {
    // Blank: 1 ± 0.0005, alternating around a flat line, so r² is near 0 [analytic: no trend, only scatter];
    // the total is an exact line, r² = 1. Its slope is small: |blank slope| / 0.06 is far under the 50% limit.
    const blank: Trace = Array.from({ length: 13 }, (_, i) => ({ t: i * 10, a: 1 + (i % 2 === 0 ? 0.0005 : -0.0005) }));
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank });
    expect(codes(r)).toEqual([]);
    expect(r.slopeBlankPerMin).not.toBeNull();
    expect(Math.abs(r.slopeBlankPerMin!)).toBeLessThan(0.001);
  });
});

describe('the background and blank are still fitted when the total cannot be (automatic window)', () => {
  it('an inhibitor background over its own straight readings: −0.012 A/min over 0–120 s', () => {
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: withNaN(line(1, -0.06)), background: line(0.9, -0.012) }, def('CI'));
    expect(r.slopeTotalPerMin).toBeNull();
    expect(r.slopeBackgroundPerMin).toBeCloseTo(-0.012, 12);
    expect(r.fitBackground).toMatchObject({ fromS: 0, toS: 120 });
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'total trace, reading 3: the absorbance is not a finite number (NaN)' },
    ]);
  });

  it('with a manual window the background is fitted over that window even when the total fails in it', () => {
    // Readings every 10 s: the window 30–90 s holds t = 30 … 90, 7 readings [by hand]; the background is an exact
    // line, so its slope over them is −0.012 A/min [analytic].
    const r = calculateActivity(
      { assay: 'CI', ...cuvette, total: withNaN(line(1, -0.06)), background: line(0.9, -0.012), window: { fromS: 30, toS: 90 } },
      def('CI'),
    );
    expect(r.fitBackground).toMatchObject({ fromS: 30, toS: 90, points: 7 });
    expect(r.slopeBackgroundPerMin).toBeCloseTo(-0.012, 12);
    expect(r.window).toEqual({ fromS: 30, toS: 90 });
  });

  it('a blank trace likewise: −0.01 A/min', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: withNaN(line(1, -0.06)) }, def('CIV'), { blank: line(1, -0.01) });
    expect(r.slopeBlankPerMin).toBeCloseTo(-0.01, 12);
    expect(r.activity).toBeNull();
  });
});

describe('an activity factor of 0 or below gives no activity (flagged, never a 0)', () => {
  // V_r 0 µL: factor = 0 × 1000 / (20 × 1 × 50 × 1) = 0 exactly; V_r −1000 µL: −1000 [by hand].
  const zeroMessage = 'The activity factor is not a finite positive number (ε 20, pathlength 1 cm, volumes 0/50 µL, protein 1 mg/mL)';
  it('traces: a reaction volume of 0', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, reactionVolumeUl: 0, total: line(1, -0.06) }, def('CIV'));
    expect(r.factor).toBe(0);
    expect(r.activity).toBeNull();
    expect(r.specificSlopePerMin).toBeCloseTo(-0.06, 12);
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: zeroMessage }]);
  });
  it('typed rates: a reaction volume of 0', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, reactionVolumeUl: 0, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CIV'));
    expect(r.factor).toBe(0);
    expect(r.activity).toBeNull();
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: zeroMessage }]);
  });
  it('a negative reaction volume gives a negative factor, also flagged', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, reactionVolumeUl: -1000, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CIV'));
    expect(r.factor).toBe(-1000);
    expect(r.activity).toBeNull();
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'The activity factor is not a finite positive number (ε 20, pathlength 1 cm, volumes -1000/50 µL, protein 1 mg/mL)' },
    ]);
  });
});

describe('equal rates and a zero total', () => {
  it('a background of 0 with a total of 0 equals it: cancelled, near zero, activity 0', () => {
    // specific = 0 − 0 = 0, and |0| ≤ 1e-9 × |0|: the two slopes are the same [analytic].
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: 0, backgroundRatePerMin: 0 }, def('CI'));
    expect(r.flags).toEqual([
      { code: 'BACKGROUND_MATCHES_TOTAL', message: 'The background slope equals the total slope: no inhibitor-sensitive rate remains' },
      { code: 'NEAR_ZERO', message: "Specific slope 0 /min is within ±0.001 /min of zero, the laboratory's limit of a measurable rate" },
    ]);
    expect(r.activity).toBe(0);
  });

  it('a background is no share of a total of 0 (no division by zero into an “infinite” share)', () => {
    // CI falls: total 0, background +0.05 → specific = −0.05, the expected way; 0.05 × 1000 = 50 [by hand].
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: 0, backgroundRatePerMin: 0.05 }, def('CI'));
    expect(r.flags).toEqual([]);
    expect(r.activity).toBeCloseTo(50, 9);
  });
});

describe('typed rates: a total that is not a number alone', () => {
  it('no slope is returned, though the background is a number', () => {
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: Number.NaN, backgroundRatePerMin: -0.02 }, def('CI'));
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: 'total rate is not a finite number (NaN)' }]);
    expect(r.slopeTotalPerMin).toBeNull();
    expect(r.slopeBackgroundPerMin).toBeNull();
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.activity).toBeNull();
  });

  it('the typed-rates result meets the public result contract (basis linear_rate)', () => {
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.08, backgroundRatePerMin: -0.02 }, def('CI'));
    expect(calculationResultSchema.safeParse(r).success).toBe(true);
    expect(r.basis).toBe('linear_rate');
  });
});

describe('first-order definitions through calculateActivity', () => {
  const civ = def('CIV', { rateModel: 'first_order' });
  /** A∞ + (A₀ − A∞)·e^(−k t), every 5 s, k per minute [analytic first-order decay]. */
  const decay = (a0: number, aInf: number, kPerMin: number, n = 60): Trace =>
    Array.from({ length: n }, (_, i) => ({ t: i * 5, a: aInf + (a0 - aInf) * Math.exp((-kPerMin * i * 5) / 60) }));

  it('with A∞ the k result is given and A∞ is not reported unused', () => {
    // ln|A − A∞| falls with slope −k [analytic]: k = 0.8 /min.
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: decay(0.95, 0.15, 0.8) }, civ, { aInfinity: 0.15 });
    expect(codes(r)).not.toContain('A_INFINITY_UNUSED');
    expect(codes(r)).not.toContain('FIRST_ORDER_NOT_COMPUTED');
    expect(r.firstOrder!.kTotalPerMin).toBeCloseTo(0.8, 9);
  });

  it('without A∞ it says the k needs the end-point absorbance, naming the definition', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, civ);
    expect(r.firstOrder).toBeNull();
    expect(r.flags).toEqual([
      {
        code: 'FIRST_ORDER_NOT_COMPUTED',
        message: 'The CIV definition reports a first-order rate constant, which needs the end-point absorbance A∞; only the linear early rate is given',
      },
    ]);
  });
});
