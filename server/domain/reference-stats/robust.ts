import { studentTQuantile } from './distributions';
import { ReferenceStatsInputError } from './errors';
import { medianSorted, sortAscending } from './quantiles';

/**
 * Smallest group the robust method accepts. Horn, Pesce & Copeland (Clin Chem 1998;44:622–631)
 * [confirmed] aim the method at small groups; 20 is our choice, the same count EP28-A3c [confirmed]
 * asks for when verifying a transferred interval. Below it, the biweight's iteration rests on too few
 * points and a lab should use "% of control mean".
 */
export const ROBUST_MIN_N = 20;

/**
 * Tuning constants as recalled [from memory] from the Horn 1998 / EP28-A3c description: c = 3.7 for the
 * biweight location (and for the standard error of that location), c = 205.6 for the spread, which
 * makes the spread nearly the SD about the median. Lab-configurable through the options.
 */
export const ROBUST_DEFAULTS = { cLocation: 3.7, cSpread: 205.6, confidence: 0.95 } as const;

/** Normal-consistency factor for the MAD: MAD / 0.6745 estimates σ for Gaussian data [from memory]. */
const MAD_TO_SIGMA = 0.6745;

export interface RobustOptions {
  cLocation?: number;
  cSpread?: number;
  /** Central coverage of the interval; 0.95 gives the 2.5th–97.5th percentiles. */
  confidence?: number;
}

function scaledMad(sorted: readonly number[], median: number): number {
  const deviations = sortAscending(sorted.map((v) => Math.abs(v - median)));
  return medianSorted(deviations) / MAD_TO_SIGMA;
}

/**
 * Tukey biweight location by iterative reweighting from the median: u = (x − T)/(c · MAD/0.6745),
 * w = (1 − u²)² for |u| < 1 else 0, T ← Σ w x / Σ w, the MAD held fixed, until T stops moving.
 */
export function biweightLocation(
  values: readonly number[],
  c: number = ROBUST_DEFAULTS.cLocation,
): number {
  const sorted = sortAscending(values);
  const median = medianSorted(sorted);
  const s = scaledMad(sorted, median);
  if (s === 0) return median;
  let t = median;
  for (let iteration = 0; iteration < 500; iteration++) {
    let weighted = 0;
    let weights = 0;
    for (const x of sorted) {
      const u = (x - t) / (c * s);
      if (Math.abs(u) < 1) {
        const w = (1 - u * u) ** 2;
        weighted += w * x;
        weights += w;
      }
    }
    const next = weighted / weights;
    const settled = Math.abs(next - t) <= 1e-12 * Math.max(1, Math.abs(t));
    t = next;
    if (settled) break;
  }
  return t;
}

/**
 * Biweight scale about `centre` with tuning constant c (Mosteller–Tukey form):
 * s = sqrt( n Σ (x − M)² (1 − u²)⁴ / [ D · max(1, D − 1) ] ), D = Σ (1 − u²)(1 − 5u²), over |u| < 1,
 * u = (x − M)/(c · MAD/0.6745), M the centre.
 */
export function biweightScale(values: readonly number[], c: number, centre?: number): number {
  const sorted = sortAscending(values);
  const median = medianSorted(sorted);
  const m = centre ?? median;
  const s = scaledMad(sorted, median);
  if (s === 0) return 0;
  let numerator = 0;
  let d = 0;
  for (const x of sorted) {
    const u = (x - m) / (c * s);
    if (Math.abs(u) < 1) {
      const u2 = u * u;
      numerator += (x - m) ** 2 * (1 - u2) ** 4;
      d += (1 - u2) * (1 - 5 * u2);
    }
  }
  return Math.sqrt((sorted.length * numerator) / (d * Math.max(1, d - 1)));
}

export interface RobustInterval {
  n: number;
  lower: number;
  upper: number;
  location: number;
  spread: number;
  locationSe: number;
  t: number;
}

/**
 * Robust reference interval after Horn, Pesce & Copeland, Clin Chem 1998 [confirmed as the source;
 * formulation from memory]:
 *   limits = T_bi ± t(0.975, n − 1) · sqrt( S_bi(205.6)² + S_bi(3.7)² / n )
 * with T_bi the biweight location (c = 3.7) and both scales taken about the median. The second term
 * is the variance of the location estimate, so this is a prediction interval for a new value.
 * It assumes a symmetric distribution: transform skewed data first.
 */
export function robustInterval(values: readonly number[], options: RobustOptions = {}): RobustInterval {
  const { cLocation, cSpread, confidence } = { ...ROBUST_DEFAULTS, ...options };
  const n = values.length;
  if (n < ROBUST_MIN_N) {
    throw new ReferenceStatsInputError(
      'values',
      `The robust method needs at least ${ROBUST_MIN_N} values; got ${n}. ` +
        'Use "% of control mean" for smaller control groups.',
    );
  }
  const sorted = sortAscending(values);
  const median = medianSorted(sorted);
  if (scaledMad(sorted, median) === 0) {
    throw new ReferenceStatsInputError(
      'values',
      'At least half of the values are identical, so the robust method cannot estimate their spread',
    );
  }
  const location = biweightLocation(sorted, cLocation);
  const spread = biweightScale(sorted, cSpread);
  const locationSe = biweightScale(sorted, cLocation) / Math.sqrt(n);
  const t = studentTQuantile(1 - (1 - confidence) / 2, n - 1);
  const halfWidth = t * Math.sqrt(spread ** 2 + locationSe ** 2);
  return { n, lower: location - halfWidth, upper: location + halfWidth, location, spread, locationSe, t };
}
