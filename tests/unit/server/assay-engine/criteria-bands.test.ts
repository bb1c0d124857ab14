import { describe, expect, it } from 'vitest';
import {
  defaultDiagnosticCriteria,
  demoReferenceIntervals,
  type ComparisonInterval,
  type DiagnosticCriteria,
} from '@/schemas/assay';
import { compareValue } from '../../../../server/domain/assay-engine/compare';
import type { ActivityMap } from '../../../../server/domain/assay-engine/normalise';
import { summarisePattern } from '../../../../server/domain/assay-engine/pattern';
import { nearMeans } from '../../../factories/workup';

/*
 * Which value a criterion band applies to, and that a band never contradicts the pattern unexplained.
 * Bands: Bernier FP et al., Neurology 2002;59:1406–1411 [from memory] — % of the control mean; tissue major
 * < 20%, minor 20–30%. Applying them to the activity relative to citrate synthase is common practice in
 * respiratory-chain diagnostics [common practice]; activities relative to CS absorb differences in
 * mitochondrial content (Frazier AE et al., Methods Cell Biol 2020 [confirmed]). Intervals: the invented demo
 * set (CS 90–210, mean 150; CI/CS 0.15–0.35, mean 0.25; …).
 */

const control = nearMeans;
const quarter = Object.fromEntries(Object.entries(control).map(([k, v]) => [k, v / 4])) as ActivityMap;
const byActivity: DiagnosticCriteria = { ...defaultDiagnosticCriteria, appliesTo: 'activity' };

function summarise(activities: ActivityMap, criteria?: DiagnosticCriteria, intervals: readonly ComparisonInterval[] = demoReferenceIntervals) {
  return summarisePattern({ specimenType: 'skeletal_muscle', ageYears: 6, activities, intervals, criteria });
}

describe('criterion bands: the value they apply to', () => {
  it('the default rule set applies the bands to the ratio to citrate synthase and says where that comes from', () => {
    expect(defaultDiagnosticCriteria.appliesTo).toBe('ratio_cs');
    expect(defaultDiagnosticCriteria.appliesToSource).toMatch(/% of control mean/);
    expect(defaultDiagnosticCriteria.appliesToSource).toMatch(/\[common practice/);
  });

  it('when every activity is at 25% of its mean with normal ratios, then the pattern is normal and no band stands beside it', () => {
    // The case: all seven activities ×0.25 → every X/CS and X/CII equals the control ratio (100% of mean).
    const s = summarise(quarter);
    expect(s.findings.map((f) => f.kind)).toEqual(['normal']);
    const activities = s.comparisons.filter((c) => c.measure === 'activity' && c.assay !== 'CS');
    expect(activities).toHaveLength(6);
    for (const c of activities) {
      expect(c.percentOfMean).toBeCloseTo(25, 10);
      expect(c.position).toBe('below');
      expect(c.band).toBeNull();
    }
    expect(s.comparisons.filter((c) => c.band === 'major' || c.band === 'minor')).toEqual([]);
  });

  it('when a laboratory applies the bands to raw activities, then each of the six minor bands says why the pattern is normal', () => {
    const s = summarise(quarter, byActivity);
    expect(s.findings.map((f) => f.kind)).toEqual(['normal']);
    const banded = s.comparisons.filter((c) => c.band === 'minor');
    // 25% of the mean: minor band (20–30%, tissue) [from memory].
    expect(banded.map((c) => c.assay).sort()).toEqual(['CI', 'CI+III', 'CII', 'CII+III', 'CIII', 'CIV']);
    for (const c of banded) {
      expect(c.measure).toBe('activity');
      expect(c.bandNote).toMatch(/in the minor band/);
      expect(c.bandNote).toMatch(/low activity with a normal ratio to citrate synthase/);
      expect(c.bandNote).toMatch(/low mitochondrial content/);
      expect(c.bandNote).toMatch(/not a respiratory-chain defect/);
      expect(s.notes).toContain(c.bandNote);
    }
    // The ratios carry no band under this rule set.
    expect(s.comparisons.filter((c) => c.measure !== 'activity' && c.band !== null)).toEqual([]);
  });

  it('when the pattern names the deficiency, then its band needs no further reason', () => {
    // CI 8 → CI/CS 0.0533 = 21.3% of 0.25 (minor) and CI/CII 0.267 (below 0.65–1.85); CII/CS normal.
    const s = summarise({ ...control, CI: 8, 'CI+III': 10 });
    expect(s.findings.map((f) => f.kind)).toEqual(['isolated_deficiency']);
    const ciToCs = s.comparisons.find((c) => c.assay === 'CI' && c.measure === 'ratio_cs')!;
    expect(ciToCs.band).toBe('minor');
    expect(ciToCs.bandNote).toBeNull();
  });

  it('when a ratio is in a band yet within a wide reference interval, then the band says the pattern follows the interval', () => {
    // An invented CI/CS interval 0.05–0.45 (mean 0.25): CI 10 → CI/CS 0.0667 = 26.7% of the mean, minor band, within.
    const wide = demoReferenceIntervals.map((i) =>
      i.assay === 'CI' && i.measure === 'ratio_cs' ? { ...i, lower: 0.05, upper: 0.45 } : i.assay === 'CI' && i.measure === 'ratio_cii' ? { ...i, lower: 0.3 } : i,
    );
    const s = summarise({ ...control, CI: 10 }, undefined, wide);
    expect(s.findings.map((f) => f.kind)).toEqual(['normal']);
    const ciToCs = s.comparisons.find((c) => c.assay === 'CI' && c.measure === 'ratio_cs')!;
    expect(ciToCs.position).toBe('within');
    expect(ciToCs.band).toBe('minor');
    expect(ciToCs.bandNote).toMatch(/CI\/CS \(27% of the reference mean\) is in the minor band/);
    expect(ciToCs.bandNote).toMatch(/still within its reference interval/);
  });
});

describe('criterion bands: decided on unrounded values, printed without contradiction', () => {
  const ciToCs = demoReferenceIntervals.find((i) => i.assay === 'CI' && i.measure === 'ratio_cs')!;
  const muscle = { specimenType: 'skeletal_muscle' as const, ageYears: 6 };

  it('when CI/CS is 19.96% of its mean, then the band is major, not the minor band of a rounded 20%', () => {
    // 0.0499 / 0.25 = 19.96% [derived].
    const c = compareValue({ assay: 'CI', measure: 'ratio_cs', value: 0.0499 }, ciToCs, muscle);
    expect(c.percentOfMean).toBeCloseTo(19.96, 10);
    expect(c.band).toBe('major');
  });

  it('when the pattern prints CI/CS at 19.96% and 20.2%, then each printed figure lies on its band’s side of 20%', () => {
    // CS 150 → CI 7.485: CI/CS 0.0499 = 19.96%; CI 7.575: CI/CS 0.0505 = 20.2% [derived].
    const text = (ci: number) =>
      summarise({ ...control, CI: ci, 'CI+III': 10 }).findings[0]!.evidence.find((e) => e.assay === 'CI' && e.measure === 'ratio_cs')!;
    const major = text(7.485);
    const minor = text(7.575);
    expect(major.band).toBe('major');
    expect(major.text).toMatch(/\(19\.96% of the reference mean; major band/);
    expect(minor.band).toBe('minor');
    expect(minor.text).toMatch(/\(20% of the reference mean; minor band/);
  });
});
