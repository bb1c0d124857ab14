import { describe, expect, it } from 'vitest';
import type { TracePoint } from '@/schemas/assay';
import { curvedPart, findLinearWindow, worstOutlier } from '../../../../server/domain/assay-engine/linearity';
import { perMinute, straightWhole } from './fixtures';

/*
 * worstOutlier on five readings one second apart, every value hand-worked (least squares of the four other
 * readings, residual SD with n − 2 = 2 degrees of freedom: Draper & Smith, Applied Regression Analysis, ch. 1
 * [from memory]; externally studentised residual = deviation from the others' line / that SD, floored at the
 * noise floor).
 */
const readings = (a: number[]): TracePoint[] => a.map((value, i) => ({ t: i, a: value }));

describe('worstOutlier on hand-worked five-reading traces', () => {
  // 0, 0, 10, 0, 0: without reading 2 the others lie exactly on a = 0, so its SD is the floor (1) and it sits
  // 10 SDs off. Without reading 0 the others (1,0) (2,10) (3,0) (4,0) give mean x 2.5, mean a 2.5, Sxx 5,
  // Sxy −5, slope −1, SSE 75 − 5 = 70, SD √35; the line at t = 0 reads 5, so reading 0 sits 5/√35 ≈ 0.845 SD
  // off [worked by hand].
  const spike = readings([0, 0, 10, 0, 0]);

  it('finds the spike 10 SDs off with exactly five readings', () => {
    const r = worstOutlier(spike, 0, 4, 3, 1)!;
    expect(r.index).toBe(2);
    expect(r.t).toBe(2);
    expect(r.sds).toBeCloseTo(10, 9);
    expect(r.deviation).toBeCloseTo(10, 9);
  });

  it('keeps the largest of several readings beyond a low limit', () => {
    // Reading 0 (0.845 SD) already passes a limit of 0.5, but the spike (10 SDs) is further.
    expect(worstOutlier(spike, 0, 4, 0.5, 1)!.index).toBe(2);
  });

  it('does not flag a reading exactly at the limit (the limit must be exceeded)', () => {
    expect(worstOutlier(spike, 0, 4, 10, 1)).toBeNull();
    expect(worstOutlier(spike, 0, 4, 9.999, 1)!.index).toBe(2);
  });

  it('uses n − 2 degrees of freedom for the SD of the other readings', () => {
    // 5, 0, 1, 0, 1: without reading 0 the others (1,0) (2,1) (3,0) (4,1) give mean x 2.5, mean a 0.5, Sxx 5,
    // Sxy 1, slope 0.2, Syy 1, SSE 1 − 0.2 = 0.8, SD √(0.8/2) = √0.4; the line at t = 0 reads 0.5 − 0.5 = 0,
    // so reading 0 sits 5/√0.4 ≈ 7.906 SDs off [worked by hand]. No floor (0).
    const r = worstOutlier(readings([5, 0, 1, 0, 1]), 0, 4, 3, 0)!;
    expect(r.index).toBe(0);
    expect(r.deviation).toBeCloseTo(5, 9);
    expect(r.sds).toBeCloseTo(5 / Math.sqrt(0.4), 9);
  });

  it('keeps the earlier of two readings equally far off (a mirror-symmetric trace)', () => {
    // 10, 0, 0, 0, 10 is its own mirror image, so readings 0 and 4 are equally far from the others' lines.
    const r = worstOutlier(readings([10, 0, 0, 0, 10]), 0, 4, 0.1, 0)!;
    expect(r.index).toBe(0);
  });
});

/*
 * curvedPart on kinked traces read once a minute (t in seconds = 60·i, so slopes are per reading = per minute).
 * The whole window is handed in as straight (its quadratic not significant), so only the part tests decide.
 * Each trace's reading noise is 0 [worked by hand: most interior readings lie on the line through their
 * neighbours, so the median pseudo-residual is 0], so any difference between part slopes is significant.
 */
const partSettings = { curvatureLimitPct: 5, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0 };

describe('curvedPart: the halves and thirds of a window', () => {
  // Six readings 0, 0, 0, −1, −2, −3: first half flat (slope 0), second half −1/min; the change against the
  // faster half is +100 % (speeds up) [worked by hand].
  const kink = perMinute([0, 0, 0, -1, -2, -3]);

  it('compares the halves from six readings on (a flat half then a falling half)', () => {
    const bent = curvedPart(kink, 0, 5, partSettings, undefined, straightWhole(6));
    expect(bent).not.toBeNull();
    expect(bent!.changePct).toBeCloseTo(100, 9);
    expect(bent!.significant).toBe(true);
  });

  it('does not judge the parts when the trace noise is unknown (not finite)', () => {
    expect(curvedPart(kink, 0, 5, partSettings, Number.POSITIVE_INFINITY, straightWhole(6))).toBeNull();
  });

  // Eight readings 0, 0, 0, −1, −2, −3, −3, −3: the halves (0,0,0,−1) and (−2,−3,−3,−3) both have slope −0.3/min
  // (Sxy −1.5, Sxx 5), so they agree; the thirds (readings 0–1, 2–4, 5–7) have slopes 0, −1, 0: the ends run
  // 100 % slower than the middle (an S) [worked by hand].
  it('compares the middle third with the outer thirds from eight readings on', () => {
    const s = perMinute([0, 0, 0, -1, -2, -3, -3, -3]);
    const bent = curvedPart(s, 0, 7, partSettings, undefined, straightWhole(8));
    expect(bent).not.toBeNull();
    expect(bent!.changePct).toBeCloseTo(-100, 9);
  });
});

/*
 * A window that lies in a lag: the readings just after it (its last reading and the next minPoints − 1 = 2)
 * run faster than the window, so it says nothing of the reaction's rate (domain.md, the rate window). Readings
 * once a minute, no start other than the first allowed (lagMaxS 0), noise 0 as above.
 */
const onlyFirstStart = { minPoints: 3, curvatureLimitPct: 5, lagMaxS: 0, nearZeroSlopePerMin: 1e-6, readingNoiseFloor: 0 };

describe('findLinearWindow: a flat window followed by a fall', () => {
  it('keeps the flat readings 0–4 when only one reading follows them (too few to judge what comes after)', () => {
    const r = findLinearWindow(perMinute([0, 0, 0, 0, 0, -1]), onlyFirstStart);
    expect(r.kind).toBe('found');
    expect([r.lo, r.hi]).toEqual([0, 4]);
  });

  it('refuses the flat readings 0–4 when the next three (0, −1, −2: −1/min) run faster', () => {
    expect(findLinearWindow(perMinute([0, 0, 0, 0, 0, -1, -2]), onlyFirstStart).kind).toBe('none');
  });

  it('judges only the next minPoints readings, not a later recovery', () => {
    // Readings 4–6 (0, −1, −2) fall at −1/min; readings 4–8 (0, −1, −2, −1, 0) would have slope 0 by symmetry.
    expect(findLinearWindow(perMinute([0, 0, 0, 0, 0, -1, -2, -1, 0]), onlyFirstStart).kind).toBe('none');
  });
});

describe('findLinearWindow: the window named when a trace is refused', () => {
  it('names the earliest three-reading window when every part of the trace speeds up', () => {
    // 0, −1, −3, −6, −10: a fall speeding up by 1/min each minute (a parabola), so no window of it is straight and
    // no three-reading window slows down: the earliest one (readings 0–2) explains the refusal.
    const r = findLinearWindow(perMinute([0, -1, -3, -6, -10]), { ...onlyFirstStart, lagMaxS: 600 });
    expect(r.kind).toBe('none');
    expect([r.lo, r.hi]).toEqual([0, 2]);
    expect(r.shape.changePct).toBeGreaterThan(5);
  });
});

describe('findLinearWindow: a lag on a trace whose clock does not start at 0', () => {
  it('counts the lag allowance from the first reading, not from time 0', () => {
    // Readings every minute from t = 600 s: 0, 0, 0, then −1/min; readings 2–8 lie exactly on one line
    // (0, −1, …, −6). The two flat opening readings are a lag stepped over: the window starts at reading 2
    // (t = 720 s, 120 s after the first reading, within lagMaxS 300) and the opening ran 100 % slower.
    const trace = [0, 0, 0, -1, -2, -3, -4, -5, -6].map((a, i) => ({ t: 600 + 60 * i, a }));
    const r = findLinearWindow(trace, { ...onlyFirstStart, lagMaxS: 300 });
    expect(r.kind).toBe('found');
    if (r.kind !== 'found') return;
    expect([r.lo, r.hi]).toEqual([2, 8]);
    expect(r.shape.slopePerMin).toBeCloseTo(-1, 9);
    expect(r.lag?.readings).toBe(2);
    expect(r.lag?.toS).toBe(720);
    expect(r.lag?.slowerPct).toBeCloseTo(100, 9);
  });
});
