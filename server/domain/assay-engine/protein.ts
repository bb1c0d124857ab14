import type { Flag } from '@/schemas/assay';
import { fitArrays, fitQuadratic } from './regression';
import { fmt } from './trace';

/*
 * Protein by a colorimetric standard curve (BCA or Bradford) [common practice]: absorbance against known
 * standard concentrations, fitted by a straight line or a quadratic (Bradford curves bend at the top);
 * unknowns are read back off the curve inside the standards only, then multiplied by their dilution.
 */

export type ProteinCurveModel = 'linear' | 'quadratic';

export interface ProteinStandard {
  concentrationMgPerMl: number;
  absorbance: number;
}

export interface ProteinCurve {
  model: ProteinCurveModel;
  /** absorbance = c0 + c1·conc + c2·conc² (c2 = 0 for a line). */
  c0: number;
  c1: number;
  c2: number;
  r2: number;
  standards: number;
  /** Concentration span of the standards, mg/mL: unknowns are read only inside it. */
  lowestMgPerMl: number;
  highestMgPerMl: number;
  /** False when the curve must not be used; the flags say why. */
  usable: boolean;
  flags: Flag[];
}

export interface ProteinCurveOptions {
  /** Curves with r² below this are flagged LOW_R2 (still usable). [common practice] 0.99. */
  r2Threshold?: number;
}

function distinctCount(xs: readonly number[]): number {
  return new Set(xs).size;
}

/** Fits the standards. Readings of the same standard may be listed separately. */
export function fitProteinCurve(
  standards: readonly ProteinStandard[],
  model: ProteinCurveModel,
  options: ProteinCurveOptions = {},
): ProteinCurve {
  const r2Threshold = options.r2Threshold ?? 0.99;
  const flags: Flag[] = [];
  const xs: number[] = [];
  const ys: number[] = [];
  standards.forEach((s, i) => {
    if (!Number.isFinite(s.concentrationMgPerMl) || !Number.isFinite(s.absorbance)) {
      flags.push({
        code: 'NON_FINITE',
        message: `standard ${i + 1}: concentration and absorbance must be finite numbers`,
      });
    } else if (s.concentrationMgPerMl < 0) {
      flags.push({
        code: 'BAD_STANDARD_CURVE',
        message: `standard ${i + 1}: concentration ${fmt(s.concentrationMgPerMl)} mg/mL cannot be negative`,
      });
    } else {
      xs.push(s.concentrationMgPerMl);
      ys.push(s.absorbance);
    }
  });
  const empty: ProteinCurve = {
    model,
    c0: Number.NaN,
    c1: Number.NaN,
    c2: 0,
    r2: 0,
    standards: xs.length,
    lowestMgPerMl: xs.length ? Math.min(...xs) : Number.NaN,
    highestMgPerMl: xs.length ? Math.max(...xs) : Number.NaN,
    usable: false,
    flags,
  };
  if (flags.length > 0) return empty;

  // A line needs 3 distinct standards to leave a degree of freedom for r²; a quadratic needs 4.
  const needed = model === 'linear' ? 3 : 4;
  if (distinctCount(xs) < needed) {
    flags.push({
      code: 'BAD_STANDARD_CURVE',
      message: `A ${model} curve needs at least ${needed} standards of different concentration; ${distinctCount(xs)} given`,
    });
    return empty;
  }

  let c0: number;
  let c1: number;
  let c2 = 0;
  let r2: number;
  if (model === 'linear') {
    const fit = fitArrays(xs, ys);
    c0 = fit.intercept;
    c1 = fit.slope;
    r2 = fit.r2;
  } else {
    const fit = fitQuadratic(xs, ys);
    if (!fit) {
      flags.push({ code: 'BAD_STANDARD_CURVE', message: 'The quadratic fit of the standards has no unique solution' });
      return empty;
    }
    ({ c0, c1, c2, r2 } = fit);
  }
  const lowest = Math.min(...xs);
  const highest = Math.max(...xs);
  const curve: ProteinCurve = {
    model,
    c0,
    c1,
    c2,
    r2,
    standards: xs.length,
    lowestMgPerMl: lowest,
    highestMgPerMl: highest,
    usable: true,
    flags,
  };
  // The derivative c1 + 2·c2·x is linear in x, so checking both ends covers the whole range.
  const slopeLow = c1 + 2 * c2 * lowest;
  const slopeHigh = c1 + 2 * c2 * highest;
  if (!(slopeLow > 0 && slopeHigh > 0)) {
    flags.push({
      code: 'BAD_STANDARD_CURVE',
      message: `The fitted curve does not rise across the standards (${fmt(lowest)}–${fmt(highest)} mg/mL), so one absorbance could mean two concentrations`,
    });
    curve.usable = false;
  }
  if (r2 < r2Threshold) {
    flags.push({
      code: 'LOW_R2',
      message: `Standard curve r² ${fmt(r2)} is below ${fmt(r2Threshold)}`,
    });
  }
  return curve;
}

/** Fitted absorbance at a concentration. */
export function curveAbsorbance(curve: ProteinCurve, mgPerMl: number): number {
  return curve.c0 + curve.c1 * mgPerMl + curve.c2 * mgPerMl * mgPerMl;
}

export interface ProteinReading {
  /** One or more readings of the same diluted unknown; their mean is read off the curve. */
  absorbances: readonly number[];
  /** Sample volume made up to this many volumes before reading (1 = undiluted). */
  dilutionFactor: number;
}

export interface ProteinResult {
  meanAbsorbance: number | null;
  /** Concentration of the diluted unknown, read off the curve. */
  readMgPerMl: number | null;
  /** Concentration in the original sample: read × dilution factor. */
  mgPerMl: number | null;
  flags: Flag[];
}

/** Reads an unknown off the curve; outside the standards it gives no value and a flag, never an extrapolation. */
export function interpolateProtein(curve: ProteinCurve, reading: ProteinReading): ProteinResult {
  const flags: Flag[] = [];
  const none = (meanAbsorbance: number | null): ProteinResult => ({
    meanAbsorbance,
    readMgPerMl: null,
    mgPerMl: null,
    flags,
  });
  if (!(Number.isFinite(reading.dilutionFactor) && reading.dilutionFactor >= 1)) {
    flags.push({
      code: 'NON_FINITE',
      message: `dilutionFactor must be a finite number of at least 1 (got ${String(reading.dilutionFactor)})`,
    });
    return none(null);
  }
  if (reading.absorbances.length === 0) {
    flags.push({ code: 'MISSING_VALUE', message: 'absorbances: no reading of the unknown was given' });
    return none(null);
  }
  let sum = 0;
  for (let i = 0; i < reading.absorbances.length; i += 1) {
    const a = reading.absorbances[i]!;
    if (!Number.isFinite(a)) {
      flags.push({ code: 'NON_FINITE', message: `absorbances, reading ${i + 1}: not a finite number` });
      return none(null);
    }
    sum += a;
  }
  const mean = sum / reading.absorbances.length;
  if (!curve.usable) {
    flags.push({ code: 'BAD_STANDARD_CURVE', message: 'The standard curve cannot be used; see its flags' });
    return none(mean);
  }
  const aLow = curveAbsorbance(curve, curve.lowestMgPerMl);
  const aHigh = curveAbsorbance(curve, curve.highestMgPerMl);
  if (mean < aLow || mean > aHigh) {
    const above = mean > aHigh;
    flags.push({
      code: 'OUTSIDE_STANDARDS',
      message: above
        ? `Absorbance ${fmt(mean)} is above the highest standard (${fmt(curve.highestMgPerMl)} mg/mL reads ${fmt(aHigh)}): dilute further and read again`
        : `Absorbance ${fmt(mean)} is below the lowest standard (${fmt(curve.lowestMgPerMl)} mg/mL reads ${fmt(aLow)}): dilute less and read again`,
    });
    return none(mean);
  }
  const read = solveCurve(curve, mean);
  return {
    meanAbsorbance: mean,
    readMgPerMl: read,
    mgPerMl: read * reading.dilutionFactor,
    flags,
  };
}

/** The concentration within the standards whose fitted absorbance equals `a` (the curve rises there). */
function solveCurve(curve: ProteinCurve, a: number): number {
  const { c0, c1, c2 } = curve;
  if (c2 === 0) return (a - c0) / c1;
  // Bisection is exact enough and cannot pick the wrong root of a quadratic.
  let lo = curve.lowestMgPerMl;
  let hi = curve.highestMgPerMl;
  for (let i = 0; i < 200 && hi - lo > 1e-15 * Math.max(1, hi); i += 1) {
    const mid = (lo + hi) / 2;
    if (c0 + c1 * mid + c2 * mid * mid < a) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
