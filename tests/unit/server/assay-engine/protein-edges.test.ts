import { linearRegression, linearRegressionLine, rSquared } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { curveAbsorbance, fitProteinCurve, interpolateProtein } from '../../../../server/domain/assay-engine/protein';

/*
 * The protein standard curve's refusals and limits (colorimetric standard curves, BCA or Bradford: read unknowns
 * only inside the standards, never off a curve that does not rise [common practice]). Expected numbers come from
 * lines and parabolas chosen by hand [analytic] or from simple-statistics (npm) [common practice].
 */
const std = (c: number, a: number) => ({ concentrationMgPerMl: c, absorbance: a });
/** A = 0.1 + 0.5·c exactly at 0, 0.5, 1 and 2 mg/mL. */
const exact = [0, 0.5, 1, 2].map((c) => std(c, 0.1 + 0.5 * c));
const codes = (flags: { code: string }[]) => flags.map((f) => f.code);

describe('fitProteinCurve: refusals', () => {
  it('a negative concentration is refused, naming the standard and its value; nothing is fitted', () => {
    const curve = fitProteinCurve([...exact, std(-0.5, 0.02)], 'linear');
    expect(curve.usable).toBe(false);
    expect(curve.flags).toEqual([
      { code: 'BAD_STANDARD_CURVE', message: 'standard 5: concentration -0.5 mg/mL cannot be negative' },
    ]);
    expect(curve.c0).toBeNaN();
    expect(curve.c1).toBeNaN();
    // The four good standards are still counted and spanned.
    expect(curve.standards).toBe(4);
    expect(curve.lowestMgPerMl).toBe(0);
    expect(curve.highestMgPerMl).toBe(2);
  });

  it('a concentration of exactly 0 is a standard (the reagent blank), not refused', () => {
    expect(fitProteinCurve(exact, 'linear').usable).toBe(true);
  });

  it('an absorbance that is not finite is refused with its standard number and no span when nothing is left', () => {
    const curve = fitProteinCurve([std(1, Number.POSITIVE_INFINITY)], 'linear');
    expect(curve.flags).toEqual([
      { code: 'NON_FINITE', message: 'standard 1: concentration and absorbance must be finite numbers' },
    ]);
    expect(curve.standards).toBe(0);
    expect(curve.lowestMgPerMl).toBeNaN();
    expect(curve.highestMgPerMl).toBeNaN();
    expect(fitProteinCurve([std(Number.NaN, 0.5), ...exact], 'linear').flags[0]!.message).toMatch(/^standard 1:/);
  });

  it('a line needs 3 different concentrations: repeats of 2 are refused, 3 pass', () => {
    // Two points leave no degree of freedom for r² (n − 2 = 0) [analytic].
    const two = fitProteinCurve([std(0, 0.1), std(0, 0.11), std(1, 0.6), std(1, 0.61)], 'linear');
    expect(two.usable).toBe(false);
    expect(two.flags).toEqual([
      {
        code: 'BAD_STANDARD_CURVE',
        message: 'A linear curve needs at least 3 standards of different concentration; 2 given',
      },
    ]);
    const three = fitProteinCurve([std(0, 0.1), std(0, 0.1), std(1, 0.6), std(2, 1.1)], 'linear');
    expect(three.usable).toBe(true);
    // Repeated readings of one standard are all used: 4 standards.
    expect(three.standards).toBe(4);
  });

  it('a quadratic needs 4 different concentrations: 4 pass', () => {
    const curve = fitProteinCurve([0, 0.5, 1, 2].map((c) => std(c, 0.02 + 0.6 * c - 0.05 * c * c)), 'quadratic');
    expect(curve.usable).toBe(true);
    expect(curve.c2).toBeCloseTo(-0.05, 10);
    expect(curve.model).toBe('quadratic');
  });

  it('a falling line is refused: one absorbance would not give one concentration in the right direction', () => {
    const curve = fitProteinCurve([0, 0.5, 1, 2].map((c) => std(c, 1.2 - 0.5 * c)), 'linear');
    expect(curve.usable).toBe(false);
    expect(curve.flags).toEqual([
      {
        code: 'BAD_STANDARD_CURVE',
        message: 'The fitted curve does not rise across the standards (0–2 mg/mL), so one absorbance could mean two concentrations',
      },
    ]);
  });

  it('a parabola that falls at the low end and rises at the top is refused too (both ends are checked)', () => {
    // A = 0.5 − 0.4c + 0.4c²: slope −0.4 at c = 0, +1.2 at c = 2 [analytic].
    const curve = fitProteinCurve([0, 0.5, 1, 1.5, 2].map((c) => std(c, 0.5 - 0.4 * c + 0.4 * c * c)), 'quadratic');
    expect(curve.usable).toBe(false);
    expect(codes(curve.flags)).toEqual(['BAD_STANDARD_CURVE']);
  });

  it('a parabola whose slope is exactly 0 at the top standard is refused (the curve must rise, not level off)', () => {
    // A = 0.1 + c − 0.25c²: slope 1 − 0.5c is 0 at c = 2 [analytic].
    const curve = fitProteinCurve([0, 0.5, 1, 1.5, 2].map((c) => std(c, 0.1 + c - 0.25 * c * c)), 'quadratic');
    expect(curve.usable).toBe(false);
  });
});

describe('fitProteinCurve: the r² limit (0.99 by default, the laboratory may set another)', () => {
  const scattered = [std(0, 0.05), std(0.5, 0.3), std(1, 0.52), std(2, 1.02), std(1.5, 0.66)];
  const data = scattered.map((s) => [s.concentrationMgPerMl, s.absorbance]);
  const r2 = rSquared(data, linearRegressionLine(linearRegression(data)));

  it('the curve’s r² is simple-statistics’ r² of the same points', () => {
    expect(fitProteinCurve(scattered, 'linear').r2).toBeCloseTo(r2, 12);
  });

  it('an r² equal to the limit is not flagged; a limit just above it is', () => {
    expect(codes(fitProteinCurve(scattered, 'linear', { r2Threshold: r2 }).flags)).toEqual([]);
    const low = fitProteinCurve(scattered, 'linear', { r2Threshold: r2 + 1e-9 });
    expect(codes(low.flags)).toEqual(['LOW_R2']);
    expect(low.usable).toBe(true);
    expect(low.flags[0]!.message).toBe(`Standard curve r² ${Number(r2.toPrecision(4))} is below ${Number((r2 + 1e-9).toPrecision(4))}`);
  });

  it('with no limit given, 0.99 applies: r² 0.98 flagged, an exact line not', () => {
    expect(r2).toBeGreaterThan(0.98);
    expect(r2).toBeLessThan(0.99);
    expect(codes(fitProteinCurve(scattered, 'linear').flags)).toEqual(['LOW_R2']);
    expect(codes(fitProteinCurve(exact, 'linear').flags)).toEqual([]);
  });
});

describe('interpolateProtein: refusals and the mean of repeated readings', () => {
  const curve = fitProteinCurve(exact, 'linear');

  it('no reading: MISSING_VALUE, no mean', () => {
    const r = interpolateProtein(curve, { absorbances: [], dilutionFactor: 1 });
    expect(r).toEqual({
      meanAbsorbance: null,
      readMgPerMl: null,
      mgPerMl: null,
      flags: [{ code: 'MISSING_VALUE', message: 'absorbances: no reading of the unknown was given' }],
    });
  });

  it('a reading that is not a number is named by its position', () => {
    const r = interpolateProtein(curve, { absorbances: [0.6, Number.NaN], dilutionFactor: 1 });
    expect(r.flags).toEqual([{ code: 'NON_FINITE', message: 'absorbances, reading 2: not a finite number' }]);
    expect(r.meanAbsorbance).toBeNull();
    expect(r.mgPerMl).toBeNull();
  });

  it('a dilution factor that is infinite or not a number is refused', () => {
    for (const d of [Number.POSITIVE_INFINITY, Number.NaN]) {
      const r = interpolateProtein(curve, { absorbances: [0.6], dilutionFactor: d });
      expect(r.mgPerMl).toBeNull();
      expect(r.flags[0]!.message).toBe(`dilutionFactor must be a finite number of at least 1 (got ${String(d)})`);
    }
  });

  it('three readings are averaged before reading the curve: (0.5 + 0.6 + 0.7)/3 = 0.6 → 1 mg/mL, ×4 → 4 mg/mL', () => {
    const r = interpolateProtein(curve, { absorbances: [0.5, 0.6, 0.7], dilutionFactor: 4 });
    expect(r.meanAbsorbance).toBeCloseTo(0.6, 12);
    expect(r.readMgPerMl).toBeCloseTo(1, 10);
    expect(r.mgPerMl).toBeCloseTo(4, 10);
  });

  it('an unusable curve reads nothing but still reports the mean absorbance', () => {
    const falling = fitProteinCurve([0, 0.5, 1, 2].map((c) => std(c, 1.2 - 0.5 * c)), 'linear');
    const r = interpolateProtein(falling, { absorbances: [0.6, 0.8], dilutionFactor: 1 });
    expect(r.meanAbsorbance).toBeCloseTo(0.7, 12);
    expect(r.mgPerMl).toBeNull();
    expect(r.flags).toEqual([{ code: 'BAD_STANDARD_CURVE', message: 'The standard curve cannot be used; see its flags' }]);
  });

  it('on a rising parabola, unknowns across the range read back their concentration to 1e-9', () => {
    // A = 0.02 + 0.6c − 0.05c² at c = 0 … 2 [analytic]; an unknown made at c reads c.
    const q = fitProteinCurve([0, 0.5, 1, 1.5, 2].map((c) => std(c, 0.02 + 0.6 * c - 0.05 * c * c)), 'quadratic');
    for (const c of [0.01, 0.37, 1.99, 2]) {
      const a = 0.02 + 0.6 * c - 0.05 * c * c;
      expect(interpolateProtein(q, { absorbances: [a], dilutionFactor: 1 }).readMgPerMl).toBeCloseTo(c, 9);
    }
  });

  it('on a parabola spanning 10–40 mg/mL, the bisection still reads to 1e-9 (its stop is relative to the top)', () => {
    const f = (c: number) => 0.05 + 0.03 * c - 0.0002 * c * c;
    const q = fitProteinCurve([10, 20, 30, 40].map((c) => std(c, f(c))), 'quadratic');
    expect(interpolateProtein(q, { absorbances: [f(27.3)], dilutionFactor: 1 }).readMgPerMl).toBeCloseTo(27.3, 9);
  });
});

describe('quadratic curves: the ends and the fitted absorbance', () => {
  // A = 0.1 + 0.1c + 0.1c² on 1–4 mg/mL: convex and rising (slope 0.3 at 1, 0.9 at 4) [analytic].
  const convex = [1, 2, 3, 4].map((c) => std(c, 0.1 + 0.1 * c + 0.1 * c * c));

  it('a convex rising curve that does not start at 0 is usable (the slope at the lowest standard is c1 + 2·c2·lowest)', () => {
    const q = fitProteinCurve(convex, 'quadratic');
    expect(q.usable).toBe(true);
    expect(q.flags).toEqual([]);
  });

  it('curveAbsorbance is c0 + c1·c + c2·c²: 0.1 + 0.4 + 1.6 = 2.1 at 4 mg/mL', () => {
    const q = fitProteinCurve(convex, 'quadratic');
    expect(curveAbsorbance(q, 4)).toBeCloseTo(2.1, 9);
    expect(curveAbsorbance(q, 1)).toBeCloseTo(0.3, 9);
  });

  it('unknowns reading exactly the lowest or highest fitted absorbance are read; a hair beyond is not', () => {
    const q = fitProteinCurve(convex, 'quadratic');
    const top = curveAbsorbance(q, 4);
    const bottom = curveAbsorbance(q, 1);
    expect(interpolateProtein(q, { absorbances: [top], dilutionFactor: 1 }).readMgPerMl).toBeCloseTo(4, 9);
    expect(interpolateProtein(q, { absorbances: [bottom], dilutionFactor: 1 }).readMgPerMl).toBeCloseTo(1, 9);
    expect(interpolateProtein(q, { absorbances: [top + 1e-9], dilutionFactor: 1 }).mgPerMl).toBeNull();
    expect(interpolateProtein(q, { absorbances: [bottom - 1e-9], dilutionFactor: 1 }).mgPerMl).toBeNull();
  });

  it('standards so large that the sums overflow are refused, not fitted', () => {
    // x⁴ of 10¹⁵⁰ overflows a double (largest about 1.8·10³⁰⁸) [analytic], so the normal equations have no finite solution.
    const curve = fitProteinCurve([0, 1, 2, 3].map((k) => std(k * 1e150, 0.1 + 0.1 * k)), 'quadratic');
    expect(curve.usable).toBe(false);
    expect(curve.flags).toEqual([{ code: 'BAD_STANDARD_CURVE', message: 'The quadratic fit of the standards has no unique solution' }]);
  });
});

