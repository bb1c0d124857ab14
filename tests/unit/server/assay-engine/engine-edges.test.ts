import { describe, expect, it } from 'vitest';
import { calculateActivity, calculateActivityFromRates } from '../../../../server/domain/assay-engine/engine';
import { codes, cuvette, def, line } from './fixtures';

/*
 * calculateActivity and calculateActivityFromRates on exact straight traces, so every slope is known
 * [analytic]: the blank cancels when a background is given, (T − blank) − (B − blank) = T − B, and is subtracted
 * from the total otherwise (docs/domain.md §1 [derived]); activity = |ΔA/min| × V_r·1000 / (ε·l·V_s·protein)
 * (Beer–Lambert, IUPAC Gold Book [confirmed]). With ε 20 (a definition set here), l 1 cm, V_r 1000 µL, V_s 50 µL
 * and 1 mg/mL, the factor is 10⁶ / (20 × 50) = 1000 exactly [derived by hand].
 */

describe('blank and background', () => {
  it('a blank given as a slope is subtracted from the total when there is no background', () => {
    // CIV (falls, no background): specific = −0.06 − (−0.01) = −0.05 → 50 nmol/min/mg.
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: -0.01 } });
    expect(r.slopeBlankPerMin).toBe(-0.01);
    expect(r.specificSlopePerMin).toBeCloseTo(-0.05, 12);
    expect(r.activity).toBeCloseTo(50, 9);
  });

  it('a blank slope that is not a number gives no activity and says so', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: Number.NaN } });
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.activity).toBeNull();
    expect(r.slopeBlankPerMin).toBeNull();
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: 'blank slope is not a finite number' }]);
  });

  it('a blank trace that cannot be fitted gives no specific slope', () => {
    const blank = line(1, -0.01).map((p, i) => (i === 2 ? { t: p.t, a: Number.NaN } : p));
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank });
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.activity).toBeNull();
    expect(r.slopeTotalPerMin).toBeCloseTo(-0.06, 12);
    expect(codes(r)).toEqual(['NON_FINITE']);
  });

  it('a blank trace is fitted over the total’s window and subtracted', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: line(1, -0.012) });
    expect(r.slopeBlankPerMin).toBeCloseTo(-0.012, 12);
    expect(r.specificSlopePerMin).toBeCloseTo(-0.048, 12);
  });

  it('a background that cannot be fitted gives no specific slope, though the total is shown', () => {
    const background = line(1, -0.01).map((p, i) => (i === 2 ? { t: p.t, a: Number.NaN } : p));
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.06), background }, def('CI'));
    expect(r.slopeTotalPerMin).toBeCloseTo(-0.06, 12);
    expect(r.slopeBackgroundPerMin).toBeNull();
    expect(r.specificSlopePerMin).toBeNull();
    expect(r.activity).toBeNull();
  });

  it('an inhibitor background with an automatic window is fitted over the total’s window, not its own', () => {
    // The background bends after 60 s: over the total's window (all 13 readings, 0–120 s) its slope is the
    // least-squares slope of the whole bent trace, not the straight first part an automatic window would keep.
    const background = line(1, -0.01).map((p) => (p.t > 60 ? { t: p.t, a: p.a - 0.0005 * (p.t - 60) } : p));
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.06), background }, def('CI'));
    expect(r.fitBackground!.fromS).toBe(0);
    expect(r.fitBackground!.toS).toBe(120);
  });
});

describe('identical and cancelling traces', () => {
  it('a background identical to the total is named as such', () => {
    const t = line(1, -0.06);
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: t, background: t.map((p) => ({ ...p })) }, def('CI'));
    expect(r.flags.find((f) => f.code === 'BACKGROUND_MATCHES_TOTAL')!.message).toBe(
      'The background trace is identical to the total trace: check that the right readings were sent for each',
    );
  });

  it('a background of the same slope but other readings cancels the total', () => {
    const r = calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.06), background: line(0.9, -0.06) }, def('CI'));
    expect(r.flags.find((f) => f.code === 'BACKGROUND_MATCHES_TOTAL')!.message).toBe(
      'The background slope equals the total slope: no inhibitor-sensitive rate remains',
    );
  });

  it('typed rates: a background 1e-9 of the total away still cancels; 1e-8 away does not', () => {
    // Same slope within one part in 10⁹ (the engine's tolerance for rounding) [our choice, engine.ts].
    expect(codes(calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.1, backgroundRatePerMin: -0.1 + 1e-10 }, def('CI')))).toContain('BACKGROUND_MATCHES_TOTAL');
    expect(codes(calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.1, backgroundRatePerMin: -0.1 + 1e-8 }, def('CI')))).not.toContain('BACKGROUND_MATCHES_TOTAL');
  });

  it('without a background nothing can cancel: a total of 0 is near zero, not “matches”', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, totalRatePerMin: 0, backgroundRatePerMin: null }, def('CIV'));
    expect(codes(r)).toEqual(['NEAR_ZERO']);
    expect(r.activity).toBe(0);
  });
});

describe('wrong direction', () => {
  it('a rising specific slope in a falling assay is named with its sign', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, totalRatePerMin: 0.05, backgroundRatePerMin: null }, def('CIV'));
    expect(r.activity).toBeNull();
    expect(r.flags).toEqual([
      { code: 'WRONG_SIGN', message: 'Specific slope 0.05 /min rises, but absorbance falls in the CIV assay: no activity is given' },
    ]);
  });
  it('a falling specific slope in a rising assay is named as falling', () => {
    const r = calculateActivityFromRates({ assay: 'CS', ...cuvette, totalRatePerMin: 0.01, backgroundRatePerMin: 0.06 }, def('CS'));
    expect(r.flags.find((f) => f.code === 'WRONG_SIGN')!.message).toBe(
      'Specific slope -0.05 /min falls, but absorbance rises in the CS assay: no activity is given',
    );
  });
  it('a rising slope in a rising assay gives the activity: 0.05 A/min × 1000 = 50', () => {
    const r = calculateActivityFromRates({ assay: 'CS', ...cuvette, totalRatePerMin: 0.06, backgroundRatePerMin: 0.01 }, def('CS'));
    expect(r.activity).toBeCloseTo(50, 9);
    expect(r.flags).toEqual([]);
  });
});

describe('background and blank shares', () => {
  it('a baseline share above the limit names the baseline, the share and what is left', () => {
    // CS baseline 0.08 of 0.1 → 80% (limit 70%), 20% left.
    const r = calculateActivityFromRates({ assay: 'CS', ...cuvette, totalRatePerMin: 0.1, backgroundRatePerMin: 0.08 }, def('CS'));
    const f = r.flags.find((x) => x.code === 'HIGH_BACKGROUND_FRACTION')!;
    expect(f.values!.backgroundPct).toBeCloseTo(80, 9);
    expect(f.values!.limitPct).toBe(70);
    expect(f.message).toBe(
      'The rate of the baseline (baseline before oxaloacetate) is 80% of the total rate (limit 70%): only 20% is the CS activity, so small errors in either slope move it a lot',
    );
  });

  it('without a note, the words say “the inhibitor” or “before the substrate”', () => {
    const ci = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.1, backgroundRatePerMin: -0.08 }, def('CI', { backgroundNote: '' }));
    expect(ci.flags.find((x) => x.code === 'HIGH_BACKGROUND_FRACTION')!.message).toMatch(/^The rate with the inhibitor \(inhibitor-insensitive\) is 80%/);
    const cs = calculateActivityFromRates({ assay: 'CS', ...cuvette, totalRatePerMin: 0.1, backgroundRatePerMin: 0.08 }, def('CS', { backgroundNote: '' }));
    expect(cs.flags.find((x) => x.code === 'HIGH_BACKGROUND_FRACTION')!.message).toMatch(/^The rate of the baseline \(before the substrate\) is 80%/);
  });

  it('a definition that subtracts nothing never flags a background share', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, totalRatePerMin: -0.1, backgroundRatePerMin: -0.09 }, def('CIV'));
    expect(codes(r)).not.toContain('HIGH_BACKGROUND_FRACTION');
  });

  it('a blank share above 50% is flagged with the share; exactly 50% is not', () => {
    const over = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: -0.036 } });
    const f = over.flags.find((x) => x.code === 'HIGH_BLANK_FRACTION')!;
    expect(f.values!.blankPct).toBeCloseTo(60, 9);
    expect(f.values!.limitPct).toBe(50);
    expect(f.message).toBe(
      "The no-sample blank's rate is 60% of the total rate (limit 50%): most of the change happens without the sample",
    );
    // Exactly half of the fitted total (the fit carries rounding, so the blank is set from it).
    const halfOf = over.slopeTotalPerMin! / 2;
    const half = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: halfOf } });
    expect(codes(half)).not.toContain('HIGH_BLANK_FRACTION');
    const justOver = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: halfOf * 1.0001 } });
    expect(codes(justOver)).toContain('HIGH_BLANK_FRACTION');
  });

  it('a blank running the other way is no share of the total; a total of 0 has no shares', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { blank: { slopePerMin: 0.05 } });
    expect(codes(r)).not.toContain('HIGH_BLANK_FRACTION');
    const zero = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: 0, backgroundRatePerMin: 0.0 }, def('CI'));
    expect(codes(zero)).not.toContain('HIGH_BACKGROUND_FRACTION');
  });
});

describe('messages naming the definition', () => {
  it('NO_BACKGROUND names the inhibitor, or the background kind when there is no note', () => {
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CI'));
    expect(r.flags).toEqual([
      {
        code: 'NO_BACKGROUND',
        message: 'The CI definition subtracts a background trace (rotenone), but none was sent: the total slope is used as the specific slope',
      },
    ]);
    const bare = calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.05) }, def('CI', { backgroundNote: '' }));
    expect(bare.flags[0]!.message).toMatch(/subtracts a background trace \(inhibitor\)/);
  });

  it('an A∞ given to a linear definition is reported unused with the definition and version', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'), { aInfinity: 0.15 });
    expect(r.flags).toEqual([
      {
        code: 'A_INFINITY_UNUSED',
        message: `An end-point absorbance A∞ = 0.15 was given, but the CIV definition in force (version ${def('CIV').version}) uses the linear rate model: A∞ was not used`,
      },
    ]);
    expect(r.firstOrder).toBeNull();
  });

  it('typed rates with a first-order definition give the linear rate only, and say why', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CIV', { rateModel: 'first_order' }));
    expect(r.activity).toBeCloseTo(50, 9);
    expect(r.flags).toEqual([
      {
        code: 'FIRST_ORDER_NOT_COMPUTED',
        message: 'The CIV definition reports a first-order rate constant, which needs the readings themselves; typed rates give only the linear early rate',
      },
    ]);
  });

  it('a factor that is not a positive number is named with every input', () => {
    const r = calculateActivityFromRates({ assay: 'CIV', ...cuvette, proteinMgPerMl: 0, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CIV'));
    expect(r.activity).toBeNull();
    expect(r.flags).toEqual([
      {
        code: 'NON_FINITE',
        message: 'The activity factor is not a finite positive number (ε 20, pathlength 1 cm, volumes 1000/50 µL, protein 0 mg/mL)',
      },
    ]);
  });

  it('the request for another assay is refused naming both', () => {
    expect(() => calculateActivity({ assay: 'CI', ...cuvette, total: line(1, -0.05) }, def('CIV'))).toThrow(
      'assay: the request is for CI but the definition given is for CIV',
    );
    expect(() => calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.05, backgroundRatePerMin: null }, def('CIV'))).toThrow(RangeError);
  });
});

describe('typed rates that are not numbers', () => {
  it('a total or background that is not finite is named; no slopes are returned', () => {
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: Number.NaN, backgroundRatePerMin: Number.POSITIVE_INFINITY }, def('CI'));
    expect(r.flags).toEqual([
      { code: 'NON_FINITE', message: 'total rate is not a finite number (NaN)' },
      { code: 'NON_FINITE', message: 'background rate is not a finite number (Infinity)' },
    ]);
    expect(r.slopeTotalPerMin).toBeNull();
    expect(r.slopeBackgroundPerMin).toBeNull();
    expect(r.specificSlopePerMin).toBeNull();
  });
  it('valid typed rates are returned as given, with the factor and no fit', () => {
    const r = calculateActivityFromRates({ assay: 'CI', ...cuvette, totalRatePerMin: -0.08, backgroundRatePerMin: -0.02 }, def('CI'));
    expect(r.slopeTotalPerMin).toBe(-0.08);
    expect(r.slopeBackgroundPerMin).toBe(-0.02);
    expect(r.specificSlopePerMin).toBeCloseTo(-0.06, 12);
    expect(r.factor).toBeCloseTo(1000, 9);
    expect(r.activity).toBeCloseTo(60, 9);
    expect(r.window).toBeNull();
    expect(r.windowAuto).toBe(false);
    expect(r.inputs).toMatchObject({ epsilonPerMmPerCm: 20, direction: 'falls', backgroundKind: 'inhibitor', rateModel: 'linear', proteinMgPerMl: 1 });
  });
});

describe('the result’s window', () => {
  it('automatic: the fitted span, marked automatic', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06) }, def('CIV'));
    expect(r.window).toEqual({ fromS: 0, toS: 120 });
    expect(r.windowAuto).toBe(true);
  });
  it('manual: the window as sent, marked manual', () => {
    const r = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06), window: { fromS: 15, toS: 95 } }, def('CIV'));
    expect(r.window).toEqual({ fromS: 15, toS: 95 });
    expect(r.windowAuto).toBe(false);
    expect(r.fitTotal!.fromS).toBe(20);
  });
  it('no fit: the span of the readings; none when a time is not finite or there are no readings', () => {
    const two = calculateActivity({ assay: 'CIV', ...cuvette, total: line(1, -0.06, 2) }, def('CIV'));
    expect(two.window).toEqual({ fromS: 0, toS: 10 });
    const bad = calculateActivity({ assay: 'CIV', ...cuvette, total: [{ t: 0, a: 1 }, { t: Number.NaN, a: 1 }] }, def('CIV'));
    expect(bad.window).toBeNull();
    const badFirst = calculateActivity({ assay: 'CIV', ...cuvette, total: [{ t: Number.NaN, a: 1 }, { t: 5, a: 1 }] }, def('CIV'));
    expect(badFirst.window).toBeNull();
    const empty = calculateActivity({ assay: 'CIV', ...cuvette, total: [] }, def('CIV'));
    expect(empty.window).toBeNull();
  });
});
