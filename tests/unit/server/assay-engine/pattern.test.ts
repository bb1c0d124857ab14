import { describe, expect, it } from 'vitest';
import { demoReferenceIntervals } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { ActivityMap } from '../../../../server/domain/assay-engine/normalise';
import { summarisePattern } from '../../../../server/domain/assay-engine/pattern';

// Logic under test: docs/domain.md §2 [from memory] (Thorburn and colleagues; Kirby DM et al., Neurology
// 1999;52:1255–1264 [confirmed]) — an isolated defect shows low X/CS and low X/CII with CII/CS normal;
// raised CS with normal ratios suggests mitochondrial proliferation. Intervals: the invented demo set
// (CS 90–210; CI/CS 0.15–0.35; CII/CS 0.12–0.28; CIII/CS 0.48–1.12; CIV/CS 0.70–1.70; CI+III/CS 0.16–0.44;
// CII+III/CS 0.15–0.39; CI/CII 0.65–1.85; CIII/CII 2–6; CIV/CII 3–9).

const control: Record<AssayCode, number> = {
  CS: 150,
  CI: 37,
  CII: 30,
  CIII: 120,
  CIV: 180,
  'CI+III': 45,
  'CII+III': 40,
};

function summarise(activities: ActivityMap, specimenType: 'skeletal_muscle' | 'fibroblasts' = 'skeletal_muscle') {
  return summarisePattern({ specimenType, ageYears: 6, activities, intervals: demoReferenceIntervals });
}

describe('pattern summary', () => {
  it('when every ratio is within its interval, then the pattern is normal', () => {
    const s = summarise(control);
    expect(s.findings.map((f) => f.kind)).toEqual(['normal']);
    expect(s.comparisons.filter((c) => c.position === 'below')).toEqual([]);
    expect(s.criteriaCitation).toMatch(/Bernier/);
  });

  it('when CI/CS and CI/CII are low with CII/CS normal, then an isolated complex I deficiency is named with its numbers', () => {
    // CI 8 → CI/CS 8/150 = 0.0533 (21.3% of 0.25), CI/CII 8/30 = 0.267 (21.3% of 1.25); CII/CS 0.20 within.
    const s = summarise({ ...control, CI: 8, 'CI+III': 10 });
    expect(s.findings).toHaveLength(1);
    const f = s.findings[0]!;
    expect(f.kind).toBe('isolated_deficiency');
    expect(f.complexes).toEqual(['CI']);
    const line = (assay: string, measure: string) => f.evidence.find((e) => e.assay === assay && e.measure === measure)!;
    expect(line('CI', 'ratio_cs').value).toBeCloseTo(8 / 150, 12);
    expect(line('CI', 'ratio_cs').percentOfMean).toBeCloseTo((100 * (8 / 150)) / 0.25, 10);
    expect(line('CI', 'ratio_cs').position).toBe('below');
    // 21.3% of the mean falls in the minor band (20–30% in a tissue), Bernier 2002 [from memory].
    expect(line('CI', 'ratio_cs').band).toBe('minor');
    expect(line('CI', 'ratio_cii').position).toBe('below');
    expect(line('CII', 'ratio_cs').position).toBe('within');
    // Printed as on the screen and the report: three significant figures, whole % from 10% up [common practice].
    expect(line('CI', 'ratio_cs').text).toMatch(/CI\/CS 0\.0533 is below the interval 0\.150–0\.350 \(21% of the reference mean; minor band/);
    // The band applies to the ratio to CS only (default rule set, appliesTo 'ratio_cs').
    expect(line('CI', 'ratio_cii').band).toBeNull();
    expect(line('CI', 'ratio_cs').intervalSetLabel).toMatch(/DEMO/);
  });

  it('when CIV/CS and CIV/CII are low with CII/CS normal, then an isolated complex IV deficiency is named', () => {
    // CIV 30 → CIV/CS 0.2 (16.7% of 1.2: major band, < 20% in a tissue), CIV/CII 1.0 (< 3).
    const s = summarise({ ...control, CIV: 30 });
    expect(s.findings.map((f) => [f.kind, f.complexes])).toEqual([['isolated_deficiency', ['CIV']]]);
    expect(s.findings[0]!.evidence.find((e) => e.measure === 'ratio_cs' && e.assay === 'CIV')!.band).toBe('major');
  });

  it('when several complexes are low, then a combined deficiency names each', () => {
    // CI 8 (CI/CS 0.053), CIII 40 (CIII/CS 0.267 < 0.48), CIV 50 (CIV/CS 0.333 < 0.70).
    const s = summarise({ ...control, CI: 8, CIII: 40, CIV: 50, 'CI+III': 10, 'CII+III': 15 });
    expect(s.findings.map((f) => f.kind)).toEqual(['combined_deficiency']);
    expect(s.findings[0]!.complexes).toEqual(['CI', 'CIII', 'CIV']);
    expect(s.findings[0]!.label).toMatch(/complex I, complex III and complex IV/);
  });

  it('when CII is low as well, then the other complexes are judged on X/CS and the deficiency is combined', () => {
    // CII/CS 10/150 = 0.067 < 0.12: CII is no longer a normal reference, so CI/CII is not needed.
    const s = summarise({ ...control, CII: 10, CI: 8 });
    expect(s.findings.map((f) => f.kind)).toEqual(['combined_deficiency']);
    expect(s.findings[0]!.complexes).toEqual(['CI', 'CII']);
  });

  it('when CS is raised and the ratios are within, then possible mitochondrial proliferation is named', () => {
    // CS 300 > 210; every complex doubled, so every X/CS stays at the control ratio.
    const doubled = Object.fromEntries(Object.entries(control).map(([k, v]) => [k, v * 2])) as ActivityMap;
    const s = summarise(doubled);
    expect(s.findings.map((f) => f.kind)).toEqual(['raised_cs']);
    expect(s.findings[0]!.label).toMatch(/possible mitochondrial proliferation/);
    const cs = s.findings[0]!.evidence.find((e) => e.assay === 'CS')!;
    expect(cs.value).toBe(300);
    expect(cs.position).toBe('above');
    expect(cs.percentOfMean).toBeCloseTo(200, 10);
  });

  it('when only a linked activity is low, then it is named apart from the single complexes', () => {
    // CII+III 12 → CII+III/CS 0.08 < 0.15 (demo interval); CII and CIII alone within. The linked assays are
    // reported beside the single complexes (docs/domain.md §1 consensus table [confirmed]); naming a low linked
    // activity apart, without calling a single complex deficient, is [common practice].
    const s = summarise({ ...control, 'CII+III': 12 });
    expect(s.findings.map((f) => [f.kind, f.complexes])).toEqual([['linked_activity_low', ['CII+III']]]);
  });

  it('when X/CS is low but X/CII is not, then no deficiency is counted and the reason is noted', () => {
    // CI 21: CI/CS 0.14 (< 0.15) but CI/CII 0.70 (within 0.65–1.85).
    const s = summarise({ ...control, CI: 21 });
    expect(s.findings.map((f) => f.kind)).toEqual(['normal']);
    expect(s.notes.join(' ')).toMatch(/CI\/CS is below its interval but CI\/CII is not/);
  });

  it('when no interval exists for the specimen type, then the summary says there is not enough to read', () => {
    const s = summarise(control, 'fibroblasts');
    expect(s.findings.map((f) => f.kind)).toEqual(['insufficient_data']);
    expect(s.notes.some((n) => /no reference interval for cultured skin fibroblasts/.test(n))).toBe(true);
  });
});
