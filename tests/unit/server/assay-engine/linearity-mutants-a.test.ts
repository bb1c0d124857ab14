import { describe, expect, it } from 'vitest';
import type { TracePoint } from '@/schemas/assay';
import { curvedPart, traceNoiseVariance, windowShape } from '../../../../server/domain/assay-engine/linearity';

/*
 * Edge cases of the window shape and the trace noise estimate, each checked against a hand-worked value.
 * - Pseudo-residual of an interior reading: its distance to the straight line through its two neighbours, divided
 *   by √(1 + w₁² + w₂²) where w₁, w₂ are the linear-interpolation weights (Gasser, Sroka & Jennen-Steinmetz,
 *   Biometrika 1986 [from memory]); 1.4826 is the normal consistency factor of the MAD [common practice].
 * - Standard error of a slope s/√Sxx (Draper & Smith, Applied Regression Analysis, ch. 1 [from memory]).
 * - Halves test: slopes of two 3-reading halves compared by Student's t with pooled residual variance
 *   SSE/(n − 4) on n − 4 df, SE of the difference √(s²·(1/Sxx₁ + 1/Sxx₂)) (Zar, Biostatistical Analysis, ch. 18
 *   [from memory]); t(0.995, 2 df) = 9.925 (standard t tables [from memory]). Residual pattern (+e, −2e, +e) on
 *   x = 0, 1, 2 leaves the slope unchanged and adds SSE 6e² [by hand: orthogonal to 1 and x].
 * Times are in seconds, x in minutes.
 */
const atMinutes = (ys: number[]): TracePoint[] => ys.map((a, i) => ({ t: i * 60, a }));
const MAD = 1.4826;

describe('traceNoiseVariance: hand-worked pseudo-residuals', () => {
  it('unevenly spaced 0, 1, 3 min with a bump of 1: w₁ = 2/3, w₂ = 1/3, size 1/√(14/9)', () => {
    const trace: TracePoint[] = [
      { t: 0, a: 0 },
      { t: 60, a: 1 },
      { t: 180, a: 0 },
    ];
    // neighbours' line at 1 min is 0, so the distance is 1; 1 + 4/9 + 1/9 = 14/9 [by hand]
    const size = 1 / Math.sqrt(14 / 9);
    expect(traceNoiseVariance(trace)).toBeCloseTo((MAD * size) ** 2, 12);
  });

  it('odd count: sizes 0.5, 1, 0.5 (unsorted middle 1) → median 0.5', () => {
    // readings 0, 0, 1, 0, 0 at 1-min steps: distances |0 − 0.5|, |1 − 0|, |0 − 0.5| [by hand], factor √1.5
    const v = traceNoiseVariance(atMinutes([0, 0, 1, 0, 0]));
    expect(v).toBeCloseTo((MAD * 0.5 / Math.sqrt(1.5)) ** 2, 12);
  });

  it('even count: sizes 1, 0.5, 1.5, 3 → median (1 + 1.5)/2 = 1.25', () => {
    // readings 0, 1, 0, 0, 3, 0: distances |1−0|, |0−0.5|, |0−1.5|, |3−0| [by hand]
    const v = traceNoiseVariance(atMinutes([0, 1, 0, 0, 3, 0]));
    expect(v).toBeCloseTo((MAD * 1.25 / Math.sqrt(1.5)) ** 2, 12);
  });
});

describe('windowShape: degenerate and noise-bounded windows', () => {
  it('two readings: slope known, its error unknown (infinite), no curvature can be judged', () => {
    const s = windowShape(atMinutes([0, 2]), 0, 1, 1e-6);
    expect(s.slopePerMin).toBeCloseTo(2, 12);
    expect(s.slopeSePerMin).toBe(Number.POSITIVE_INFINITY);
    expect(s.significant).toBe(false);
    expect(s.startSlopePerMin).toBeCloseTo(2, 12);
  });

  it('readings 0, 1, 0 at 0, 1, 2 min: slope 0, s² = (2/3)/1, Sxx = 2 → SE √(1/3); with noise 0.02 → SE 0.1', () => {
    const trace = atMinutes([0, 1, 0]);
    // mean 1/3, residuals −1/3, 2/3, −1/3 → SSE 2/3 [by hand]
    expect(windowShape(trace, 0, 2, 1e-6).slopeSePerMin).toBeCloseTo(Math.sqrt(1 / 3), 12);
    expect(windowShape(trace, 0, 2, 1e-6, Number.NaN).slopeSePerMin).toBeCloseTo(Math.sqrt(1 / 3), 12);
    // the smaller reading noise bounds the error: √(0.02 / 2) = 0.1
    expect(windowShape(trace, 0, 2, 1e-6, 0.02).slopeSePerMin).toBeCloseTo(0.1, 12);
  });

  it('an exact straight line 0, 1, 2, 3: quadratic term t = 0, n counts both ends', () => {
    const s = windowShape(atMinutes([0, 1, 2, 3, 9]), 0, 3, 1e-6);
    expect(s.n).toBe(4);
    expect(s.slopePerMin).toBeCloseTo(1, 12);
    expect(s.curvatureT).toBe(0);
  });

  it('a NaN reading noise is ignored: the curvature t equals that without noise and is finite', () => {
    const trace = atMinutes([0, 1.1, 1.9, 2.2, 2.5]);
    const without = windowShape(trace, 0, 4, 1e-6);
    const withNaN = windowShape(trace, 0, 4, 1e-6, Number.NaN);
    expect(Number.isFinite(without.curvatureT)).toBe(true);
    expect(withNaN.curvatureT).toBe(without.curvatureT);
  });
});

describe('windowShape: three readings leave no residual degrees of freedom', () => {
  it('1.1, 0.7, 0.55: the quadratic passes through all three, so its bend (c2 = 0.125 > 0) has t = +∞', () => {
    // second difference 0.55 − 1.4 + 1.1 = 0.25 = 2·c2 [by hand]; residual variance 0 even when a noise is given
    expect(windowShape(atMinutes([1.1, 0.7, 0.55]), 0, 2, 1e-6, 1e-4).curvatureT).toBe(Number.POSITIVE_INFINITY);
  });
});

/** Six readings at 1-min steps: halves of slope 1 and 0.5, each with residual pattern (+e, −2e, +e). */
const halvesTrace = (e: number): TracePoint[] =>
  atMinutes([0 + e, 1 - 2 * e, 2 + e, 3 + e, 3.5 - 2 * e, 4 + e]);
const settings = { curvatureLimitPct: 5, nearZeroSlopePerMin: 1e-6 };
/** The whole-window quadratic test taken as passed, so only the halves decide. */
const passedWhole = (trace: TracePoint[]) => ({ ...windowShape(trace, 0, trace.length - 1, 1e-6), significant: false });
const halves = (e: number, noise: number, nearZero = 1e-6) => {
  const trace = halvesTrace(e);
  return curvedPart(trace, 0, 5, { ...settings, nearZeroSlopePerMin: nearZero }, noise, passedWhole(trace));
};

describe('curvedPart: halves test worked by hand', () => {
  it('e = 0.025: s² = 12e²/2, SE = e√6 = 0.0612, t = 0.5/0.0612 = 8.16 < 9.925 → straight', () => {
    expect(halves(0.025, 1)).toBeNull();
  });

  it('e = 0.017: t = 0.5/(0.017·√6) = 12.0 > 9.925 → bent, second half 50% slower', () => {
    const bent = halves(0.017, 1);
    expect(bent).not.toBeNull();
    expect(bent!.significant).toBe(true);
    expect(bent!.changePct).toBeCloseTo(-50, 6);
  });

  it('no residuals (e = 0) and a reading noise of 0.01: the parts\' variance 0 is smaller, t = ∞ → bent', () => {
    // with the noise instead, SE = √(0.01·1) = 0.1 and t = 5 < 9.925 would pass it
    expect(halves(0, 0.01)!.changePct).toBeCloseTo(-50, 9);
  });

  it('near-zero slope threshold: faster half 1/min below a threshold of 2 → no change; at exactly 1 → still judged', () => {
    expect(halves(0, 0.01, 2)).toBeNull();
    expect(halves(0, 0.01, 1)!.changePct).toBeCloseTo(-50, 9);
  });
});

describe('curvedPart: thirds test worked by hand', () => {
  // Nine readings, thirds of slope 0.5, 1, 0.5, each with residual pattern (+e, −2e, +e): pooled s² = 18e²/3 = 6e²;
  // contrast m − (a + c)/2 = 0.5 with weights (−½, 1, −½), SE = √(6e²·(¼ + 1 + ¼)/2) = e√4.5;
  // t(0.995, 3 df) = 5.841 (standard t tables [from memory]).
  it('e = 0.033: t = 0.5/(0.033·√4.5) = 7.14 > 5.841 → the middle runs faster than the ends', () => {
    const e = 0.033;
    const r = [e, -2 * e, e];
    const ys = [0, 0.5, 1, 2, 3, 4, 4.5, 5, 5.5].map((y, i) => y + r[i % 3]!);
    const trace = atMinutes(ys);
    const bent = curvedPart(trace, 0, 8, settings, 1, passedWhole(trace));
    expect(bent).not.toBeNull();
    expect(bent!.changePct).toBeCloseTo(-50, 6);
  });
});

describe('windowShape: a parabola read at short intervals', () => {
  // A = 0.1 + 0.6·x − 3·x² (x in min): the quadratic's start rate is 0.6; for evenly spaced x from 0 to X the
  // line's slope is the rate at the middle, b + c·X [by hand]. Short spacings make the fit's sums tiny, not singular.
  it.each([1, 0.05])('three readings %s s apart: start rate 0.6, line slope 0.6 − 3·X', (step) => {
    const trace = [0, 1, 2].map((k) => ({ t: k * step, a: 0.1 + 0.6 * ((k * step) / 60) - 3 * ((k * step) / 60) ** 2 }));
    const shape = windowShape(trace, 0, 2, 1e-6);
    expect(shape.startSlopePerMin).toBeCloseTo(0.6, 6);
    expect(shape.slopePerMin).toBeCloseTo(0.6 - 3 * ((2 * step) / 60), 6);
  });
});

describe('windowShape: near-zero threshold of the change', () => {
  // A = x − 0.25·x² at x = 0, 1, 2 min (0, 0.75, 1): start rate 1, line slope 1 − 0.25·2 = 0.5 → −50% [by hand]
  const trace = atMinutes([0, 0.75, 1]);
  it('a faster rate exactly at the threshold (1/min) is still judged: −50%', () => {
    expect(windowShape(trace, 0, 2, 1).changePct).toBeCloseTo(-50, 9);
  });
  it('below a threshold of 1.5/min the change is taken as 0', () => {
    expect(windowShape(trace, 0, 2, 1.5).changePct).toBe(0);
  });
});

describe('curvedPart: a tent has a zero thirds contrast', () => {
  // 0,1,2,3 | 3,3,3,3 | 3,2,1,0 at 1-min steps: thirds' slopes 1, 0, −1 with no residuals, so the contrast
  // m − (a + c)/2 = 0 and its t is 0 however small the error; the halves' slopes are mirror images (same size)
  // [by hand]. Only the whole-window quadratic test can see this shape.
  const trace = atMinutes([0, 1, 2, 3, 3, 3, 3, 3, 3, 2, 1, 0]);
  it('the part tests alone let it pass', () => {
    expect(curvedPart(trace, 0, 11, settings, 0.01, passedWhole(trace))).toBeNull();
  });
  it('the whole-window quadratic test flags it', () => {
    expect(curvedPart(trace, 0, 11, settings, 0.01)).not.toBeNull();
  });
});
