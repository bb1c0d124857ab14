import { describe, expect, it } from 'vitest';
import type { TracePoint } from '@/schemas/assay';
import { curvedPart, findLinearWindow, isolatedReading, windowShape, worstOutlier } from '../../../../server/domain/assay-engine/linearity';
import { perMinute, straightWhole } from './fixtures';

/*
 * The bubble rules of the rate window (docs/domain.md § 5a), each checked on a hand-made trace against a value
 * worked by hand. Tests for the Stryker survivors of linearity.ts listed in docs/testing.md ("fifth pass").
 *
 * A reading's pseudo-residual is its distance to the straight line through its two neighbours divided by
 * √(1 + w₁² + w₂²), w₁, w₂ the interpolation weights (Gasser, Sroka & Jennen-Steinmetz, Biometrika 1986
 * [from memory]); on evenly spaced readings w₁ = w₂ = ½, so the divisor is √1.5. A reading counts as a bubble only
 * when it stands further off than both its neighbours (the earlier of two equal ones), and only beyond
 * limitSd × √noiseVariance (docs/domain.md § 5a).
 */
const everySecond = (a: number[]): TracePoint[] => a.map((value, i) => ({ t: i, a: value }));

describe('isolatedReading: only a reading further off than both its neighbours is a bubble', () => {
  // 0, 0, 0, 3, 0, 0, 0: reading 3 is 3 off its neighbours' line (size 3/√1.5 ≈ 2.449); readings 2 and 4 are
  // each |0 − 3/2| = 1.5 off theirs (size 1.5/√1.5 ≈ 1.225); the rest 0 [worked by hand]. Limit 1 × √1 = 1.
  const spike = everySecond([0, 0, 0, 3, 0, 0, 0]);

  it('finds the lifted reading itself', () => {
    expect(isolatedReading(spike, 0, 6, 1, 1)).toBe(3);
  });

  it('does not take the reading after it (1.225 above the limit, but smaller than the reading before it)', () => {
    expect(isolatedReading(spike, 4, 6, 1, 1)).toBeNull();
  });

  it('does not take the reading before it (1.225 above the limit, but smaller than the reading after it)', () => {
    expect(isolatedReading(spike, 0, 2, 1, 1)).toBeNull();
  });

  // 0, 0, 0, 2, 2, 0, 0, 0: a two-reading plateau. Readings 2 to 5 are each 1 off their neighbours' line
  // (|0 − 1|, |2 − 1|, |2 − 1|, |0 − 1|), size 1/√1.5 ≈ 0.816 [worked by hand]: four equal sizes in a row, and
  // only the first of them (reading 2: above reading 1's 0, not below reading 3's equal size) is the odd one out.
  const plateau = everySecond([0, 0, 0, 2, 2, 0, 0, 0]);

  it('of equal sizes in a row, takes the first (ties with the next reading count, ties with the one before do not)', () => {
    expect(isolatedReading(plateau, 0, 7, 0.5, 1)).toBe(2);
    expect(isolatedReading(plateau, 3, 7, 0.5, 1)).toBeNull();
  });
});

describe('isolatedReading: the largest one beyond the limit, within the window', () => {
  // √1.5 lifted alone on a flat trace is exactly 1 off its neighbours' line once divided by √1.5 [by hand].
  const r = Math.sqrt(1.5);

  it('needs the limit exceeded: a size exactly at the limit is not a bubble', () => {
    const trace = everySecond([0, 0, 0, r, 0, 0, 0]);
    expect(isolatedReading(trace, 0, 6, 1, 1)).toBeNull();
    expect(isolatedReading(trace, 0, 6, 0.999, 1)).toBe(3);
  });

  it('looks at the window’s last reading too', () => {
    // 0, 0, 0, 3, 0, 0: reading 3 is the last of window 0..3.
    expect(isolatedReading(everySecond([0, 0, 0, 3, 0, 0]), 0, 3, 1, 1)).toBe(3);
  });

  it('takes the larger of two bubbles wherever it lies, and the earlier of two equal ones', () => {
    // 0, 0, 4, 0, 0, 2, 0, 0: readings 1 to 6 are 2, 4, 2, 1, 2, 1 off their neighbours' lines (÷ √1.5), so
    // readings 2 (4, neighbours 2 and 2) and 5 (2, neighbours 1 and 1) both stand out; reading 2 more [by hand].
    expect(isolatedReading(everySecond([0, 0, 4, 0, 0, 2, 0, 0]), 0, 7, 1, 1)).toBe(2);
    // 0, 0, 2, 0, 0, 4, 0, 0: the larger one is later.
    expect(isolatedReading(everySecond([0, 0, 2, 0, 0, 4, 0, 0]), 0, 7, 1, 1)).toBe(5);
    // 0, 0, 3, 0, 0, 3, 0, 0: equal sizes 3/√1.5 at readings 2 and 5 (readings 3 and 4 each 1.5 off): the earlier.
    expect(isolatedReading(everySecond([0, 0, 3, 0, 0, 3, 0, 0]), 0, 7, 1, 1)).toBe(2);
  });
});

/*
 * curvedPart's bubble check: a window that is already bent is reported as read; a straight one is judged again
 * without its bubble when it has 4 readings or more. The whole window is handed in as straight (its quadratic not
 * significant), so only the part tests and the bubble check decide. Readings once a minute (x in minutes).
 */
const bubbleSettings = { curvatureLimitPct: 5, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0, outlierLimitSd: 1 };

describe('curvedPart: a bent window keeps its own verdict when bubbles are looked for', () => {
  it('reports the halves of 0, 0, 0, −1, −2, −3 (flat, then −1/min: +100 %) with no reading left out', () => {
    // Halves 0, 0, 0 (slope 0) and −1, −2, −3 (slope −1/min); the change against the faster half is +100 %, and
    // both halves lie exactly on their lines, so the difference is significant at any noise [worked by hand].
    // Noise variance 1 and limit 1 SD: the largest reading-to-neighbours distance is 0.5/√1.5 (reading 2), no bubble.
    const bent = curvedPart(perMinute([0, 0, 0, -1, -2, -3]), 0, 5, bubbleSettings, 1, straightWhole(6));
    expect(bent).not.toBeNull();
    expect(bent!.changePct).toBeCloseTo(100, 9);
    expect(bent!.leftOut).toBeUndefined();
  });
});

describe('curvedPart: a four-reading window is judged without its bubble', () => {
  // 0, 3, −1, −2 at 0, 1, 2, 3 min: reading 1 is |3 − (0 − 1)/2| = 3.5 off its neighbours' line, reading 2
  // |−1 − (3 − 2)/2| = 1.5; size 3.5/√1.5 ≈ 2.86 > limit 1 × √1, and larger than both neighbours: a bubble.
  // Without it: 0, −1, −2 at 0, 2, 3 min, not on one line (−0.5/min, then −1/min). Quadratic through them
  // [by hand]: 2c₁ + 4c₂ = −1, 3c₁ + 9c₂ = −2 → c₂ = −1/6, c₁ = −1/6 (the start rate). Straight line: x̄ = 5/3,
  // ȳ = −1, Sxx = 25/9 + 1/9 + 16/9 = 42/9, Sxy = −5/3 − 4/3 = −3, slope −27/42 = −9/14. Change in the line's
  // direction against the faster rate: 100 × (9/14 − 1/6)/(9/14) = 100 × 40/54 ≈ 74.07 % (speeds up). Three
  // readings leave no degrees of freedom to judge the quadratic by, so it is not excused as noise.
  const trace = perMinute([0, 3, -1, -2]);

  it('finds the remaining three readings bent and names the reading left out', () => {
    const bent = curvedPart(trace, 0, 3, bubbleSettings, 1, straightWhole(4));
    expect(bent).not.toBeNull();
    expect(bent!.changePct).toBeCloseTo((100 * 40) / 54, 9);
    expect(bent!.leftOut).toEqual({ index: 1, t: 60 });
  });

  it('does not look for bubbles when the definition sets no limit', () => {
    const { outlierLimitSd: _none, ...noLimit } = bubbleSettings;
    expect(curvedPart(trace, 0, 3, noLimit, 1, straightWhole(4))).toBeNull();
  });
});

describe('curvedPart: a straight window after a lag, with no bubble', () => {
  it('is straight: the readings before the window play no part', () => {
    // 0, 0, 0, 0, 0, −1, −2, −3, −4, −5, −6: readings 5–10 lie exactly on a = 4 − i (−1/min) and are each 0 off
    // their neighbours' line, so the window has no bubble and nothing to bend it; the flat readings before it
    // (a lag) are outside the window [worked by hand].
    const trace = perMinute([0, 0, 0, 0, 0, -1, -2, -3, -4, -5, -6]);
    expect(curvedPart(trace, 5, 10, bubbleSettings, 1, straightWhole(6))).toBeNull();
  });
});

describe('curvedPart: part tests at their edges', () => {
  const noBubbles = { curvatureLimitPct: 5, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0 };

  it('a middle third exactly at the mean of the outer thirds is no S, though its ends run 100 % faster', () => {
    // 0, 1, 2, 3 | 3, 3, 3, 3 | 3, 2, 1, 0 (thirds of 12): slopes +1, 0, −1/min, each third exactly on its line
    // (no residuals). The S contrast m − (a + c)/2 = 0 − 0 = 0 with standard error 0: no evidence of an S at all,
    // whatever the change of the part speeds ((1 + 1)/2 against 0, 100 %). The halves 0, 1, 2, 3, 3, 3 and
    // 3, 3, 3, 2, 1, 0 are mirror images: slopes +s and −s, equally fast, so they agree [worked by hand].
    const peak = perMinute([0, 1, 2, 3, 3, 3, 3, 3, 3, 2, 1, 0]);
    expect(curvedPart(peak, 0, 11, noBubbles, 1, straightWhole(12))).toBeNull();
  });

  it('a part rate exactly at the near-zero rate still counts (only rates below it are taken as no rate)', () => {
    // 0, 0, 0, −1, −2, −3: halves' slopes 0 and −1/min exactly (x = 3, 4, 5 min: Sxy −2, Sxx 2) [by hand]. With the
    // near-zero rate set to 1/min the faster half is not below it, so the change is +100 % and the window bent.
    const bent = curvedPart(perMinute([0, 0, 0, -1, -2, -3]), 0, 5, { ...noBubbles, nearZeroSlopePerMin: 1 }, 1, straightWhole(6));
    expect(bent?.changePct).toBeCloseTo(100, 9);
  });
});

describe('windowShape: a flat window when no rate is taken as near zero', () => {
  it('gives a change of 0 %, not 0/0, for four equal readings with the near-zero rate set to 0', () => {
    // 1, 1, 1, 1: the line's slope and the quadratic's start rate are both exactly 0 [by hand], so there is no
    // faster rate to compare with; the change is 0 (not NaN) even when the near-zero rate is 0.
    const s = windowShape(perMinute([1, 1, 1, 1]), 0, 3, 0);
    expect(s.slopePerMin).toBe(0);
    expect(s.changePct).toBe(0);
  });

  it('judges the change when the faster rate is exactly the near-zero rate (only rates below it are no rate)', () => {
    // 0, −1, −3 at 0, 1, 2 min: line slope Sxy/Sxx = −3/2 = −1.5/min; quadratic through the three readings
    // c₁ + c₂ = −1, 2c₁ + 4c₂ = −3 → c₂ = −0.5, start rate c₁ = −0.5/min [by hand]. The faster rate, 1.5/min,
    // is not below a near-zero rate of 1.5, so the change is 100 × (1.5 − 0.5)/1.5 ≈ +66.67 % (speeds up).
    expect(windowShape(perMinute([0, -1, -3]), 0, 2, 1.5).changePct).toBeCloseTo(200 / 3, 9);
  });
});

describe('worstOutlier: needs five readings', () => {
  it('names no reading of a four-reading window, though one stands 10 floor SDs off the line through the others', () => {
    // 0, 0, 10, 0 one second apart: the others (0, 0), (1, 0), (3, 0) lie exactly on a = 0, so reading 2 is 10 off
    // with an SD of the floor (1): 10 SDs [by hand]. Four readings leave the others' line 1 degree of freedom, too
    // few to call a reading an outlier (linearity.ts: "Needs 5 readings or more").
    expect(worstOutlier(everySecond([0, 0, 10, 0]), 0, 3, 3, 1)).toBeNull();
    // the same reading in a five-reading window (a fifth 0 at 4 s) is found, 10 SDs off.
    expect(worstOutlier(everySecond([0, 0, 10, 0, 0]), 0, 4, 3, 1)?.sds).toBeCloseTo(10, 9);
  });

  it('counts the readings of a window that does not start at the first reading', () => {
    // 9, 11, 1, 2, 3, 4 one second apart, window 1..5 (reading 0, outside it, plays no part): the others 1, 2, 3, 4 at
    // 2, 3, 4, 5 s lie exactly on a = t − 1 (no residuals, so the SD is the floor, 1), which reads 0 at 1 s, so
    // reading 1 is 11 off: 11 SDs [by hand]. The others' means are over the window's four other readings.
    const r = worstOutlier(everySecond([9, 11, 1, 2, 3, 4]), 1, 5, 3, 1);
    expect(r?.index).toBe(1);
    expect(r?.sds).toBeCloseTo(11, 9);
    expect(r?.deviation).toBeCloseTo(11, 9);
  });
});

/*
 * The give-way rule of the window search (docs/domain.md § 5a; linearity.ts findLinearWindow, step 2): the earliest
 * window of the fastest rate, when it holds a bubble, gives way only to a LONGER window of the same rate WITHOUT one.
 *
 * Trace: a = −i (−1/min, one reading a minute) with reading 3 lifted by 1 (−2 for −3). Distances to the
 * neighbours' line (÷ √1.5): reading 2 |−2 − (−1 − 2)/2| = 0.5, reading 3 |−2 − (−2 − 4)/2| = 1, reading 4 0.5, the
 * others 0: the median of the seven inner readings is 0, so the noise is the floor, SD 0.05, and the bubble limit
 * 4 × 0.05 = 0.2; only reading 3 (1/√1.5 ≈ 0.82, above both neighbours) is a bubble [by hand].
 *
 * A window's quadratic term, with one reading lifted by d at x, is d·P₂(x)/ΣP₂² where P₂(x) = (x − x̄)² − (n² − 1)/12
 * is the orthogonal quadratic on n evenly spaced readings, with SE σ/√ΣP₂² (σ = 0.05: the noise floor is below the
 * window's own residuals); its line slope −1 + d·(x − x̄)/Sxx, and its start rate c₁ = slope − c₂·(n − 1) [derived by
 * hand: on a symmetric design the line's slope is the quadratic's rate at x̄]. Student's t(0.995): 9.925 (2 df),
 * 5.841 (3), 4.604 (4), 4.032 (5), 3.707 (6) [standard tables, from memory].
 * - From reading 0: 0..8 (n 9, x 3: P₂ −17/3, ΣP₂² 308, t ≈ 6.5, change ≈ +14 %), 0..7 (P₂ −5 of 168, t ≈ 7.7,
 *   ≈ +21 %), 0..6 (P₂ −4 of 84, t ≈ 8.7, ≈ +29 %), 0..5 (P₂ −8/3 of 112/3, t ≈ 8.7, ≈ +37 %) all bend beyond 5 %;
 *   0..4 (P₂ −1 of 14, t ≈ 5.3 < 9.925) is straight as read, straight without reading 3 (0, −1, −2, −4 at 0, 1, 2,
 *   4 min: one line) and the three readings after it run at its rate: the earliest window, 0..4, holding the bubble.
 * - From reading 2: 2..8 holds the bubble at x = 1 of 7, where P₂ = (1 − 3)² − 4 = 0: no quadratic term; its halves
 *   (readings 2–4 and 5–8) both run at −1/min (the bubble is the middle of the first half): a longer window of the
 *   same rate (without its bubble, every window here runs at −1/min), but holding the bubble itself.
 * - Without reading 3 a window starts at reading 4 at the earliest: 4..8, five readings, no more than 0..4.
 * So no window to give way to: 0..4 is kept and nothing is reported as avoided.
 */
describe('findLinearWindow: a window holding a bubble gives way only to a longer one without it', () => {
  const trace = perMinute([0, -1, -2, -2, -4, -5, -6, -7, -8]);
  const settings = { minPoints: 3, curvatureLimitPct: 5, lagMaxS: 240, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0.05, outlierLimitSd: 4 };

  it('keeps the earliest window 0..4 over a longer one that holds the bubble and one as long without it', () => {
    const found = findLinearWindow(trace, settings);
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect([found.lo, found.hi]).toEqual([0, 4]);
    expect(found.avoided).toBeNull();
    expect(found.lag).toBeNull();
  });
});

describe('findLinearWindow: the opening readings before the window (the lag figures)', () => {
  it('gives a finite lag figure (0 %) when the window itself has no rate', () => {
    // 1, 0, 0, 0, 0, 0, 0 once a minute, 5 readings at least: every window from reading 0 bends (one reading 1 above
    // a flat line at x = 0: quadratic term d·P₂(0)/ΣP₂², t = d·P₂(0)/(σ√ΣP₂²) with σ = the floor 0.05 (the median
    // distance to the neighbours is 0): n 5: 2/√14/0.05 ≈ 10.7 > 9.925; n 6: 3.33/√37.3/0.05 ≈ 10.9 > 5.841; n 7:
    // 5/√84/0.05 ≈ 10.9 > 4.604, each a change beyond 70 % [by hand]). From reading 1 the readings are flat:
    // rate 0. The opening is the line through readings 0 and 1, −1/min; a percentage of a zero rate has no
    // meaning, so the figure is 0, not ±Infinity (it is written into the report's JSON).
    const found = findLinearWindow(perMinute([1, 0, 0, 0, 0, 0, 0]), { minPoints: 5, curvatureLimitPct: 5, lagMaxS: 600, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0.05 });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect([found.lo, found.hi]).toEqual([1, 6]);
    expect(found.shape.slopePerMin).toBe(0);
    expect(found.lag).toEqual({ readings: 1, toS: 60, openingSlopePerMin: -1, slowerPct: 0 });
  });

  it('does not start a window on a reading far off its neighbours, and measures the opening without it', () => {
    // 0, 1, 0, −1, …, −9 once a minute: readings 1 to 11 lie on a = 2 − i; reading 0 sits 2 below that line. Reading
    // 1 is |1 − (0 + 0)/2| = 1 off its neighbours' line, the others 0 (reading 2: |0 − (1 − 1)/2| = 0), so reading 1
    // counts as a bubble (noise the floor 0.05, limit 0.2) [by hand]. Reading 0 bends every window from 0, and no
    // window starts on reading 1, so the window starts at reading 2. The opening, readings 0 to 2 without reading 1,
    // is flat: (0 − 0)/2 min = 0 per minute, 100% slower than the window's −1 per minute [by hand]. (A window starting
    // on reading 1 measured the opening through it: +1 per minute; on uneven times a "lag" −495% slower.)
    const trace = perMinute([0, 1, 0, -1, -2, -3, -4, -5, -6, -7, -8, -9]);
    const found = findLinearWindow(trace, { minPoints: 3, curvatureLimitPct: 5, lagMaxS: 600, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0.05, outlierLimitSd: 4 });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect(found.lo).toBe(2);
    expect(found.shape.slopePerMin).toBeCloseTo(-1, 12);
    expect(found.lag?.readings).toBe(2);
    expect(found.lag?.openingSlopePerMin).toBeCloseTo(0, 12);
    expect(found.lag?.slowerPct).toBeCloseTo(100, 9);
  });

  it('on uneven times, a bubble at the second reading neither starts the window nor makes the lag run faster than the reaction', () => {
    // Readings at 0, 10, 60, 120 … 540 s: 0, then 1 (a bubble), then −(t − 60)/60. The window is 60–540 s at −1 per
    // minute; the opening, 0 and 60 s without the bubble, is flat: 100% slower [by hand]. It was the window 10–540 s
    // with an opening of +6 per minute, a lag "−494.7% slower".
    const times = [0, 10, ...Array.from({ length: 9 }, (_, i) => 60 * (i + 1))];
    const trace = times.map((t, i) => ({ t, a: i === 0 ? 0 : i === 1 ? 1 : -(t - 60) / 60 }));
    const found = findLinearWindow(trace, { minPoints: 5, curvatureLimitPct: 5, lagMaxS: 120, nearZeroSlopePerMin: 0.001, readingNoiseFloor: 0.002, outlierLimitSd: 4 });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect(trace[found.lo]!.t).toBe(60);
    expect(found.shape.slopePerMin).toBeCloseTo(-1, 9);
    expect(found.lag?.openingSlopePerMin).toBeCloseTo(0, 9);
    expect(found.lag?.slowerPct).toBeCloseTo(100, 6);
  });
});

/*
 * Two equal bubbles in the window that gives way: the earlier is named (as isolatedReading names it).
 * Trace: a = −i once a minute, reading 1 lifted by 1 (0 for −1) and reading 3 lowered by 1 (−4 for −3). Distances to
 * the neighbours' line (÷ √1.5): reading 1 |0 − (0 − 2)/2| = 1, reading 2 |−2 − (0 − 4)/2| = 0, reading 3
 * |−4 − (−2 − 4)/2| = 1, reading 4 |−4 − (−4 − 5)/2| = 0.5, the rest 0: median 0, noise the floor 0.05, limit 0.2;
 * readings 1 and 3 are bubbles of exactly the same size [by hand].
 * - From reading 0 (orthogonal quadratic as above, σ = 0.05): 0..9 (P₂ 4 and −6 of ΣP₂² 528: c₂ = 10/528, t ≈ 8.7 >
 *   3.499, change ≈ −14 %), 0..8 (c₂ = 8/308, t ≈ 9.1, ≈ −17 %), 0..7 (6/168, t ≈ 9.3, ≈ −19 %), 0..6 (4/84, t ≈ 8.7,
 *   ≈ −21 %), 0..5 (2/37.3, t ≈ 6.6 > 5.841, ≈ −19 %) bend; 0..4 has P₂ = −1 at both bubbles, which cancel: no
 *   quadratic term. Without reading 1 its readings (0, 0), (2, −2), (3, −4), (4, −4) leave a quadratic term of
 *   1.14/12.57 ≈ 0.091 with SE 0.05/√12.57 ≈ 0.014, t ≈ 6.5 < 63.66 (1 df): straight. The readings after it (4–7)
 *   run at −1/min, slower than its −1.086/min. The earliest window is 0..4, holding both bubbles.
 * - The first start past both bubbles is reading 4: 4..9 lies on one line, six readings, longer than 0..4 — the
 *   window given, 4 readings later, in place of the one holding the bubbles at 1 and 3.
 */
describe('findLinearWindow: naming the bubble a window gave way for', () => {
  it('names the earlier of two equal bubbles (reading 1, not reading 3)', () => {
    const found = findLinearWindow(perMinute([0, 0, -2, -4, -4, -5, -6, -7, -8, -9]), {
      minPoints: 4,
      curvatureLimitPct: 5,
      lagMaxS: 240,
      nearZeroSlopePerMin: 1e-6,
      readingNoiseFloor: 0.05,
      outlierLimitSd: 4,
    });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect([found.lo, found.hi]).toEqual([4, 9]);
    expect(found.avoided).toEqual({ index: 1, t: 60, readings: 4, fromS: 0, toS: 240 });
  });
});

/*
 * A flat trace (a blank, no reaction) read once a minute with one bubble: 0, 1, 0, 0, 0, 0, 0, 0, 0, 0. Distances to
 * the neighbours' line: reading 1 |1 − 0| = 1, reading 2 |0 − ½| = 0.5, the rest 0; no floor, so the noise is 0 and
 * reading 1 (above both neighbours) is the only bubble [by hand]. With no noise any quadratic term is significant,
 * so a window is straight only where the bubble leaves no quadratic term and no change.
 * - From reading 0 (the bubble at x = 1; P₂ and c₂ = d·P₂(1)/ΣP₂² as above): 0..9 (P₂ 4 of 528, start rate
 *   −0.111 against the line's −0.042: change ≈ −62 %), 0..8 (2.33 of 308, ≈ −55 %), 0..7 (1 of 168, ≈ −41 %) bend;
 *   0..6 has P₂(1) = 1 − 4 = 0: in its exact sums Szy = 1 − 91/7 = −12, Sxy = 1 − 21/7 = −2, Sxx 28, Sxz 168, so
 *   c₂ ∝ 28·(−12) − 168·(−2) = 0; its halves (readings 0–2 and 3–6) are both flat (the bubble is the middle of the
 *   first). Without reading 1 it is flat. The readings after it are flat too. Rate 0, and its slope's SE is 0 (the
 *   noise, 0, bounds it).
 * - From reading 1 every window starts on the bubble (x = 0, where P₂ is never 0): bent.
 * - From reading 2 (lagMaxS 120 s: the last start): 2..9, flat, no bubble, rate 0, longer than 0..6.
 * All rates are exactly 0 and the allowance is 0: both windows are of the fastest rate ("within 0 of 0"), and 0..6,
 * holding the bubble, gives way to 2..9.
 */
describe('findLinearWindow: a flat trace with a bubble near its start', () => {
  it('gives way from 0..6 (holding the bubble) to 2..9, the rates being equal at exactly 0', () => {
    const found = findLinearWindow(perMinute([0, 1, 0, 0, 0, 0, 0, 0, 0, 0]), {
      minPoints: 3,
      curvatureLimitPct: 5,
      lagMaxS: 120,
      nearZeroSlopePerMin: 1e-6,
      readingNoiseFloor: 0,
      outlierLimitSd: 4,
    });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect([found.lo, found.hi]).toEqual([2, 9]);
    expect(found.shape.slopePerMin).toBe(0);
    expect(found.avoided).toEqual({ index: 1, t: 60, readings: 2, fromS: 0, toS: 120 });
    expect(found.lag).toBeNull();
  });
});

describe('findLinearWindow: giving way when the earliest window does not start at the first reading', () => {
  it('gives way from 1..7 to 3..10 and counts the readings left out from the earliest window’s start', () => {
    // −1, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0: reading 0 sits 1 below a flat trace and reading 2 1 above it. Distances to
    // the neighbours' line: reading 1 |0 − (−1 + 1)/2| = 0, reading 2 |1 − 0| = 1, reading 3 0.5, the rest 0: noise 0,
    // reading 2 the only bubble [by hand]. From reading 0 every window either runs from −1 into the flat (without
    // reading 2: a bend at the start, significant at noise 0) or is the three readings 0..2, the minimum, holding the
    // bubble: none. From reading 1 the readings are those of the flat trace above (the bubble at x = 1), shifted by
    // one: 1..7 is straight (P₂(1) = 0 for seven readings) and every longer window bends (1..10, ten readings:
    // P₂(1) = (1 − 4.5)² − 8.25 = 4 of 528, as above). From reading 2 every window starts on the bubble. From reading 3,
    // 3..10 is flat and clean: 8 readings, longer than 1..7's 7. All rates are 0, so 1..7 gives way to 3..10, two
    // readings later; the readings before 1..7 (reading 0) are its lag, rising at (0 − (−1))/1 min = +1/min, and a
    // percentage of the window's zero rate is 0.
    const found = findLinearWindow(perMinute([-1, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0]), {
      minPoints: 3,
      curvatureLimitPct: 5,
      lagMaxS: 180,
      nearZeroSlopePerMin: 1e-6,
      readingNoiseFloor: 0,
      outlierLimitSd: 4,
    });
    expect(found.kind).toBe('found');
    if (found.kind !== 'found') return;
    expect([found.lo, found.hi]).toEqual([3, 10]);
    expect(found.avoided).toEqual({ index: 2, t: 120, readings: 2, fromS: 60, toS: 180 });
    expect(found.lag).toEqual({ readings: 1, toS: 60, openingSlopePerMin: 1, slowerPct: 0 });
  });
});
