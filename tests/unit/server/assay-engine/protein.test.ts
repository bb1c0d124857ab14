import { linearRegression } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { fitProteinCurve, interpolateProtein } from '../../../../server/domain/assay-engine/protein';

// Hand-computed worked example [derived by hand, shown here]:
//   standards (mg/mL, A): (0, 0.05) (0.5, 0.30) (1.0, 0.52) (2.0, 1.02)
//   x̄ = 0.875, ȳ = 0.4725, Sxx = 2.1875, Sxy = 1.05625
//   slope = 1.05625 / 2.1875 = 0.4828571…, intercept = 0.4725 − 0.4828571 × 0.875 = 0.05
//   unknown read twice, 0.52 and 0.54 → mean 0.53 → (0.53 − 0.05) / 0.4828571 = 0.9940828 mg/mL
//   diluted 1 in 10 → 9.940828 mg/mL in the homogenate.
const linearStandards = [
  { concentrationMgPerMl: 0, absorbance: 0.05 },
  { concentrationMgPerMl: 0.5, absorbance: 0.3 },
  { concentrationMgPerMl: 1.0, absorbance: 0.52 },
  { concentrationMgPerMl: 2.0, absorbance: 1.02 },
];

describe('protein standard curve', () => {
  it('when a linear curve is fitted, then it matches the hand-computed line and simple-statistics', () => {
    const curve = fitProteinCurve(linearStandards, 'linear');
    expect(curve.usable).toBe(true);
    expect(curve.c1).toBeCloseTo(0.4828571, 6);
    expect(curve.c0).toBeCloseTo(0.05, 10);
    // Cross-check: simple-statistics linearRegression (npm) [common practice].
    const lr = linearRegression(linearStandards.map((s) => [s.concentrationMgPerMl, s.absorbance]));
    expect(curve.c1).toBeCloseTo(lr.m, 12);
    expect(curve.c0).toBeCloseTo(lr.b, 12);
  });

  it('when an unknown is read off the linear curve, then its dilution factor is applied', () => {
    const curve = fitProteinCurve(linearStandards, 'linear');
    const r = interpolateProtein(curve, { absorbances: [0.52, 0.54], dilutionFactor: 10 });
    expect(r.meanAbsorbance).toBeCloseTo(0.53, 12);
    expect(r.readMgPerMl).toBeCloseTo(0.9940828, 6);
    expect(r.mgPerMl).toBeCloseTo(9.940828, 5);
    expect(r.flags).toEqual([]);
  });

  it('when a quadratic curve is fitted to a bending curve, then an unknown is read on the rising branch', () => {
    // Hand-computed: A = 0.02 + 0.6c − 0.05c² at c = 0, 0.5, 1, 1.5, 2 → 0.02, 0.3075, 0.57, 0.8075, 1.02;
    // an unknown at A = 0.02 + 0.72 − 0.072 = 0.668 is c = 1.2 mg/mL; diluted 1 in 5 → 6.0 mg/mL.
    const standards = [0, 0.5, 1, 1.5, 2].map((c, i) => ({
      concentrationMgPerMl: c,
      absorbance: [0.02, 0.3075, 0.57, 0.8075, 1.02][i]!,
    }));
    const curve = fitProteinCurve(standards, 'quadratic');
    expect(curve.usable).toBe(true);
    const r = interpolateProtein(curve, { absorbances: [0.668], dilutionFactor: 5 });
    expect(r.readMgPerMl).toBeCloseTo(1.2, 9);
    expect(r.mgPerMl).toBeCloseTo(6.0, 8);
  });

  it('OUTSIDE_STANDARDS: when an unknown reads above the top standard, then no value is extrapolated', () => {
    // Issue item 4: values outside the standards flagged, never extrapolated silently.
    const curve = fitProteinCurve(linearStandards, 'linear');
    const r = interpolateProtein(curve, { absorbances: [1.2], dilutionFactor: 10 });
    expect(r.mgPerMl).toBeNull();
    expect(r.flags.map((f) => f.code)).toEqual(['OUTSIDE_STANDARDS']);
    expect(r.flags[0]!.message).toMatch(/above the highest standard/);
  });

  it('OUTSIDE_STANDARDS: when an unknown reads below the lowest standard, then no value is given', () => {
    const curve = fitProteinCurve(linearStandards, 'linear');
    const r = interpolateProtein(curve, { absorbances: [0.03], dilutionFactor: 1 });
    expect(r.mgPerMl).toBeNull();
    expect(r.flags[0]!.message).toMatch(/below the lowest standard/);
  });

  it('when a quadratic turns over inside the standards, then the curve is refused', () => {
    // A = 0.1 + c − 0.4c² peaks at c = 1.25, inside 0–2 mg/mL: one absorbance, two concentrations.
    const standards = [0, 0.5, 1, 1.5, 2].map((c) => ({ concentrationMgPerMl: c, absorbance: 0.1 + c - 0.4 * c * c }));
    const curve = fitProteinCurve(standards, 'quadratic');
    expect(curve.usable).toBe(false);
    expect(curve.flags.map((f) => f.code)).toEqual(['BAD_STANDARD_CURVE']);
    expect(interpolateProtein(curve, { absorbances: [0.5], dilutionFactor: 1 }).mgPerMl).toBeNull();
  });

  it('when too few standards are given for the model, then the curve is refused with the count', () => {
    const curve = fitProteinCurve(linearStandards.slice(0, 3), 'quadratic');
    expect(curve.usable).toBe(false);
    expect(curve.flags[0]!.message).toMatch(/at least 4 standards .* 3 given/);
  });

  it('when the standards scatter, then the curve is usable but its r² is flagged', () => {
    const scattered = [...linearStandards, { concentrationMgPerMl: 1.5, absorbance: 0.4 }];
    const curve = fitProteinCurve(scattered, 'linear');
    expect(curve.usable).toBe(true);
    expect(curve.flags.map((f) => f.code)).toEqual(['LOW_R2']);
  });

  it('when a standard or a dilution is not a number, then it is named', () => {
    const curve = fitProteinCurve([...linearStandards, { concentrationMgPerMl: 3, absorbance: Number.NaN }], 'linear');
    expect(curve.flags[0]!.message).toMatch(/standard 5/);
    const good = fitProteinCurve(linearStandards, 'linear');
    expect(interpolateProtein(good, { absorbances: [0.5], dilutionFactor: 0 }).flags[0]!.message).toMatch(/dilutionFactor/);
  });
});
