import { describe, expect, it } from 'vitest';
import { defaultDiagnosticCriteria, demoReferenceIntervals, type ComparisonInterval, type DiagnosticCriteria } from '@/schemas/assay';
import type { ActivityMap } from '../../../../server/domain/assay-engine/normalise';
import { summarisePattern } from '../../../../server/domain/assay-engine/pattern';
import { nearMeans } from '../../../factories/workup';

/*
 * The case-level reading, after docs/domain.md §2: an isolated defect shows low X/CS and low X/CII with CII/CS
 * normal; raised CS with normal ratios suggests mitochondrial proliferation [from memory] (Thorburn and
 * colleagues; Kirby DM et al., Neurology 1999;52:1255–1264 [confirmed]). Bands: Bernier FP et al., Neurology
 * 2002;59:1406–1411 [from memory], tissue major < 20%, minor 20–30% of the control mean. Intervals: the invented
 * demo set (CS 90–210; CI/CS 0.15–0.35; CII/CS 0.12–0.28; CIII/CS 0.48–1.12; CIV/CS 0.70–1.70;
 * CI+III/CS 0.16–0.44; CII+III/CS 0.15–0.39; CI/CII 0.65–1.85). Every ratio below is worked by hand.
 */
const control = nearMeans;
const byActivity: DiagnosticCriteria = { ...defaultDiagnosticCriteria, appliesTo: 'activity' };
const byRatioCii: DiagnosticCriteria = { ...defaultDiagnosticCriteria, appliesTo: 'ratio_cii' };
function summarise(
  activities: ActivityMap,
  extra: { criteria?: DiagnosticCriteria; intervals?: readonly ComparisonInterval[]; bases?: Parameters<typeof summarisePattern>[0]['bases'] } = {},
) {
  return summarisePattern({
    specimenType: 'skeletal_muscle',
    ageYears: 6,
    activities,
    intervals: extra.intervals ?? demoReferenceIntervals,
    criteria: extra.criteria,
    bases: extra.bases,
  });
}
const kinds = (s: ReturnType<typeof summarise>) => s.findings.map((f) => f.kind);

describe('findings and their words', () => {
  it('two linked activities low, singles within: both named, joined with “and”, with the single ratios as evidence', () => {
    // CI+III 5 → 0.033 < 0.16; CII+III 12 → 0.08 < 0.15.
    const s = summarise({ ...control, 'CI+III': 5, 'CII+III': 12 });
    expect(kinds(s)).toEqual(['linked_activity_low']);
    const f = s.findings[0]!;
    expect(f.label).toBe('Low linked activity (complex I+III and complex II+III) with each single complex within its interval');
    expect(f.complexes).toEqual(['CI+III', 'CII+III']);
    expect(f.evidence.map((e) => `${e.assay}:${e.measure}`)).toEqual([
      'CI+III:ratio_cs',
      'CII+III:ratio_cs',
      'CI:ratio_cs',
      'CII:ratio_cs',
      'CIII:ratio_cs',
      'CIV:ratio_cs',
    ]);
    expect(s.headline).toBe(f.label);
  });

  it('complex II alone low: “Isolated low complex II activity” with only CII/CS as evidence', () => {
    // CII 10 → CII/CS 0.067 < 0.12; every other X/CS within.
    const s = summarise({ ...control, CII: 10 });
    expect(kinds(s)).toEqual(['isolated_deficiency']);
    expect(s.findings[0]!.label).toBe('Isolated low complex II activity');
    expect(s.findings[0]!.evidence.map((e) => `${e.assay}:${e.measure}`)).toEqual(['CII:ratio_cs']);
  });

  it('an isolated complex I defect with CI+III low too lists CI/CS, CI/CII, CII/CS and CI+III/CS', () => {
    const s = summarise({ ...control, CI: 8, 'CI+III': 10 });
    const f = s.findings[0]!;
    expect(f.label).toBe('Isolated low complex I activity (low relative to citrate synthase and to complex II)');
    expect(f.evidence.map((e) => `${e.assay}:${e.measure}`)).toEqual(['CI:ratio_cs', 'CI:ratio_cii', 'CII:ratio_cs', 'CI+III:ratio_cs']);
  });

  it('a combined defect lists each line once even when two complexes cite CII/CS', () => {
    // CI 8 and CIV 50 (CIV/CS 0.333 < 0.70, CIV/CII 1.67 < 3): both cite CII/CS.
    const s = summarise({ ...control, CI: 8, CIV: 50, 'CI+III': 10 });
    expect(kinds(s)).toEqual(['combined_deficiency']);
    const keys = s.findings[0]!.evidence.map((e) => `${e.assay}:${e.measure}`);
    expect(keys).toEqual(['CI:ratio_cs', 'CI:ratio_cii', 'CII:ratio_cs', 'CIV:ratio_cs', 'CIV:ratio_cii', 'CI+III:ratio_cs']);
    expect(s.findings[0]!.label).toBe('Low activity of more than one complex: complex I and complex IV');
  });

  it('raised CS lowering every ratio: a combined defect and raised CS, the second saying the ratios are lowered', () => {
    // CS 300 halves every X/CS: CI 0.123, CII 0.1, CIII 0.4, CIV 0.6 — all below.
    const s = summarise({ ...control, CS: 300 });
    expect(kinds(s)).toEqual(['combined_deficiency', 'raised_cs']);
    const raised = s.findings[1]!;
    expect(raised.label).toBe(
      'Raised citrate synthase: ratios to citrate synthase are lowered by the raised denominator as well as by any defect',
    );
    expect(raised.complexes).toEqual(['CS']);
    expect(raised.evidence[0]!.assay).toBe('CS');
    expect(raised.evidence[0]!.measure).toBe('activity');
    // Every ratio to CS follows as evidence.
    expect(raised.evidence.filter((e) => e.measure === 'ratio_cs')).toHaveLength(6);
    expect(s.headline).toBe(`${s.findings[0]!.label}; ${raised.label}`);
  });

  it('all activities low with normal ratios: normal, with a note naming them and pointing at mitochondrial content', () => {
    const quarter = Object.fromEntries(Object.entries(control).map(([k, v]) => [k, v / 4])) as ActivityMap;
    const s = summarise(quarter);
    expect(kinds(s)).toEqual(['normal']);
    expect(s.findings[0]!.label).toBe('No deficiency pattern: ratios to citrate synthase and to complex II within their intervals');
    expect(s.notes).toContain(
      'Activities below their intervals (CS, CI, CII, CIII, CIV, CI+III, CII+III) while the ratios are within theirs: this points to low mitochondrial content or sample quality rather than a single defect',
    );
    // The normal finding shows CS and every ratio (6 to CS, 3 to CII), no raw activity but CS.
    const ev = s.findings[0]!.evidence;
    expect(ev[0]!.assay).toBe('CS');
    expect(ev.filter((e) => e.measure === 'activity')).toHaveLength(1);
    expect(ev).toHaveLength(10);
  });

  it('a normal case has no note about low activities', () => {
    const s = summarise(control);
    expect(s.notes.filter((n) => /Activities below their intervals/.test(n))).toEqual([]);
    expect(s.findings[0]!.evidence[0]!.text).toMatch(/^CS activity 150 is within the interval .* \(100% of the reference mean; DEMO.* v1\)$/);
  });

  it('no CS: not enough to read, and each missing denominator is noted', () => {
    const { CS: _cs, ...rest } = control;
    const s = summarise(rest);
    expect(kinds(s)).toEqual(['insufficient_data']);
    expect(s.findings[0]!.label).toBe(
      'Not enough results to read a pattern (no activity could be compared relative to citrate synthase)',
    );
    expect(s.findings[0]!.complexes).toEqual([]);
    expect(s.headline).toBe(s.findings[0]!.label);
    expect(s.criteria).toBe(defaultDiagnosticCriteria);
  });

  it('without CII, a low X/CS counts as a deficiency (there is no normal CII to compare against)', () => {
    const { CII: _cii, ...rest } = control;
    const s = summarise({ ...rest, CI: 20 });
    // CI/CS 0.133 < 0.15; CI/CII cannot be computed.
    expect(kinds(s)).toEqual(['isolated_deficiency']);
    expect(s.findings[0]!.complexes).toEqual(['CI']);
  });

  it('a first-order complex IV value is never read against linear-rate intervals: no CIV defect is named', () => {
    // CIV 30 would be an isolated CIV defect on the linear basis (CIV/CS 0.2 < 0.70).
    const linear = summarise({ ...control, CIV: 30 });
    expect(kinds(linear)).toEqual(['isolated_deficiency']);
    const k = summarise({ ...control, CIV: 30 }, { bases: { CIV: 'first_order_k' } });
    expect(kinds(k)).toEqual(['normal']);
    expect(k.comparisons.filter((c) => c.assay === 'CIV').every((c) => c.position === null)).toBe(true);
    expect(k.notes.some((n) => /CIV/.test(n))).toBe(true);
  });
});

describe('why a band stands beside a pattern that does not reflect it', () => {
  it('no CS: an activity in a band says no ratio to CS could be compared', () => {
    const quarter = Object.fromEntries(Object.entries(control).map(([k, v]) => [k, v / 4])) as ActivityMap;
    const { CS: _cs, ...rest } = quarter;
    const s = summarise(rest, { criteria: byActivity });
    const ci = s.comparisons.find((c) => c.assay === 'CI' && c.measure === 'activity')!;
    expect(ci.band).toBe('minor');
    expect(ci.bandNote).toBe(
      'CI activity (25% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I: no ratio to citrate synthase could be compared, so the pattern cannot tell a defect from low mitochondrial content',
    );
    expect(s.notes).toContain(ci.bandNote);
  });

  it('a low ratio to CII alone (CII raised) says the pattern reads the ratio to CS', () => {
    // CII 100: CII/CS 0.667 (above); CI 37: CI/CS 0.247 within; CI/CII 0.37 = 29.6% of 1.25 → minor band.
    const s = summarise({ ...control, CII: 100 }, { criteria: byRatioCii });
    expect(kinds(s)).toEqual(['normal']);
    const c = s.comparisons.find((x) => x.assay === 'CI' && x.measure === 'ratio_cii')!;
    expect(c.band).toBe('minor');
    expect(c.bandNote).toBe(
      'CI/CII (29.6% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I: CI/CS is within its interval; the pattern reads the ratio to citrate synthase, and a low ratio to complex II alone may reflect a raised complex II',
    );
  });

  it('X/CS in a band but X/CII within, with CII/CS normal: the defect is not shown', () => {
    // CI/CII interval lowered to 0.5 (invented): CII 20 → CII/CS 0.133 within; CI 10 → CI/CS 0.0667 = 26.7%
    // (minor band, below 0.15), CI/CII 0.5 within.
    const intervals = demoReferenceIntervals.map((i) => (i.assay === 'CI' && i.measure === 'ratio_cii' ? { ...i, lower: 0.5 } : i));
    const s = summarise({ ...control, CII: 20, CI: 10 }, { intervals });
    expect(kinds(s)).toEqual(['normal']);
    expect(s.notes).toContain('CI/CS is below its interval but CI/CII is not: not counted as a deficiency');
    const c = s.comparisons.find((x) => x.assay === 'CI' && x.measure === 'ratio_cs')!;
    expect(c.bandNote).toBe(
      'CI/CS (27% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I: CI/CII is within its interval while complex II relative to citrate synthase is normal, so a defect of complex I is not shown',
    );
  });

  it('a linked activity in a band beside an isolated complex I defect gets the plain reason', () => {
    // By activity: CI 8 (21.6% minor, named by the finding); CI+III 10 (22.2% minor); CI+III/CS 0.067 below
    // is evidence, but the CI+III activity itself is not reflected.
    const s = summarise({ ...control, CI: 8, 'CI+III': 10 }, { criteria: byActivity });
    expect(kinds(s)).toEqual(['isolated_deficiency']);
    expect(s.comparisons.find((x) => x.assay === 'CI' && x.measure === 'activity')!.bandNote).toBeNull();
    const c = s.comparisons.find((x) => x.assay === 'CI+III' && x.measure === 'activity')!;
    expect(c.band).toBe('minor');
    expect(c.bandNote).toBe(
      'CI+III activity (22% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I+III: the pattern does not count complex I+III as deficient',
    );
  });
});

/*
 * Third pass (mutation survivors of pattern.ts). Every ratio below is worked by hand against the invented demo
 * intervals; an interval changed for one test is marked "invented" and named. Rules: docs/domain.md §2 [from
 * memory] (an isolated defect shows low X/CS and low X/CII with CII/CS normal — a CII/CS above its interval is
 * not low, so CII still serves as the reference [derived]); a raised denominator lowers every ratio to it
 * [derived: x/CS falls as CS rises]; bands after Bernier 2002 [from memory].
 */
const key = (c: { assay: string; measure: string }) => `${c.assay}:${c.measure}`;
const withInterval = (assay: string, measure: string, over: Partial<ComparisonInterval>) =>
  demoReferenceIntervals.map((i) => (i.assay === assay && i.measure === measure ? { ...i, ...over } : i));
const comparison = (s: ReturnType<typeof summarise>, k: string) => s.comparisons.find((c) => key(c) === k)!;

describe('what is compared and what is noted', () => {
  it('a case at the control means: 16 comparisons (7 activities, 6 ratios to CS, 3 to CII), no note, no complex named', () => {
    // 7 activities; X/CS for CI, CII, CIII, CIV, CI+III, CII+III; X/CII for CI, CIII, CIV (docs/domain.md §2).
    const s = summarise(control);
    expect(s.comparisons).toHaveLength(16);
    expect(new Set(s.comparisons.map(key)).size).toBe(16);
    expect(s.notes).toEqual([]);
    expect(s.findings[0]!.complexes).toEqual([]);
  });

  it('CII not measured: nothing is compared for CII itself, and each ratio to CII says its denominator is missing', () => {
    const { CII: _cii, ...rest } = control;
    const s = summarise(rest);
    const keys = s.comparisons.map(key);
    expect(keys).not.toContain('CII:activity');
    expect(keys).not.toContain('CII:ratio_cs');
    // 6 activities + 5 ratios to CS + the 3 ratios to CII, which have no value.
    expect(keys).toHaveLength(14);
    for (const x of ['CI', 'CIII', 'CIV']) expect(s.notes).toContain(`${x}/CII: the CII activity is missing`);
    expect(s.notes.filter((n) => n.startsWith('CII activity') || n.startsWith('CII/CS'))).toEqual([]);
  });

  it('CS not measured: not enough to read, no evidence, and every ratio to CS says its denominator is missing', () => {
    const { CS: _cs, ...rest } = control;
    const s = summarise(rest);
    expect(s.findings[0]!.evidence).toEqual([]);
    for (const x of ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III']) expect(s.notes).toContain(`${x}/CS: the CS activity is missing`);
  });

  it('one linked activity low: named alone in the label, without a list', () => {
    // CII+III 12 → CII+III/CS 0.08 < 0.15.
    const s = summarise({ ...control, 'CII+III': 12 });
    expect(s.findings[0]!.label).toBe('Low linked activity (complex II+III) with each single complex within its interval');
  });
});

describe('CII/CS above its interval still makes CII a reference', () => {
  it('X/CS low but X/CII within, with CII/CS above: not counted as a deficiency', () => {
    // CI/CII interval lowered to 0.3 (invented). CS 150, CII 60 → CII/CS 0.40 > 0.28 (above); CI 20 → CI/CS 0.133
    // < 0.15 (below) and CI/CII 0.333 ≥ 0.3 (within). CIII 150 → 1.0 and 2.5; CIV 240 → 1.6 and 4.0 (within).
    const s = summarise({ ...control, CII: 60, CI: 20, CIII: 150, CIV: 240 }, { intervals: withInterval('CI', 'ratio_cii', { lower: 0.3 }) });
    expect(comparison(s, 'CII:ratio_cs').position).toBe('above');
    expect(kinds(s)).toEqual(['normal']);
    expect(s.notes).toContain('CI/CS is below its interval but CI/CII is not: not counted as a deficiency');
  });
});

describe('raised citrate synthase', () => {
  // CS 300 (> 210) with every other activity doubled but CI: CI 37 → CI/CS 0.123 < 0.15 and CI/CII 37/60 = 0.617
  // < 0.65; CII/CS 0.2, CIII/CS 0.8, CIV/CS 1.2, CI+III/CS 0.3, CII+III/CS 0.267 within.
  const raisedCiLow = { CS: 300, CI: 37, CII: 60, CIII: 240, CIV: 360, 'CI+III': 90, 'CII+III': 80 };

  it('one ratio to CS below: the raised-CS finding says the ratios are lowered, not proliferation', () => {
    const s = summarise(raisedCiLow);
    expect(kinds(s)).toEqual(['isolated_deficiency', 'raised_cs']);
    expect(s.findings[1]!.label).toBe(
      'Raised citrate synthase: ratios to citrate synthase are lowered by the raised denominator as well as by any defect',
    );
  });

  it('its evidence is CS activity and the six ratios to CS, nothing else', () => {
    const s = summarise(raisedCiLow);
    expect(s.findings[1]!.evidence.map(key).sort()).toEqual(
      ['CS:activity', 'CI:ratio_cs', 'CII:ratio_cs', 'CIII:ratio_cs', 'CIV:ratio_cs', 'CI+III:ratio_cs', 'CII+III:ratio_cs'].sort(),
    );
  });

  it('a ratio in a band that the pattern does not count, with CS raised: the band is put down to the raised CS', () => {
    // CI/CII interval lowered to 0.3 (invented). CS 300, CII 60 → CII/CS 0.2 (within); CI 20 → CI/CS 0.0667 =
    // 26.7% of 0.25 (minor band, below 0.15) and CI/CII 0.333 (within): not counted. No deficiency finding.
    const s = summarise({ ...raisedCiLow, CI: 20 }, { intervals: withInterval('CI', 'ratio_cii', { lower: 0.3 }) });
    expect(kinds(s)).toEqual(['raised_cs']);
    const c = comparison(s, 'CI:ratio_cs');
    expect(c.band).toBe('minor');
    expect(c.bandNote).toBe(
      'CI/CS (27% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I: citrate synthase is raised, which lowers every ratio to it; the band may reflect the raised citrate synthase rather than a defect',
    );
  });
});

describe('which bands a deficiency finding accounts for', () => {
  const bandNotes = (s: ReturnType<typeof summarise>) => s.notes.filter((n) => /band of the criteria/.test(n));

  it('a combined deficiency accounts for the bands of its complexes and of the low linked activity it cites', () => {
    // CI 8 → CI/CS 0.0533 (21.3% of 0.25, minor); CIV 50 → CIV/CS 0.333 (27.8% of 1.2, minor); CI+III 10 →
    // CI+III/CS 0.0667 (22.2% of 0.3, minor).
    const s = summarise({ ...control, CI: 8, CIV: 50, 'CI+III': 10 });
    for (const k of ['CI:ratio_cs', 'CIV:ratio_cs', 'CI+III:ratio_cs']) {
      expect(comparison(s, k).band).toBe('minor');
      expect(comparison(s, k).bandNote).toBeNull();
    }
    expect(bandNotes(s)).toEqual([]);
  });

  it('a low linked activity accounts for its own band', () => {
    // CI+III 5 → CI+III/CS 0.0333 = 11.1% of 0.3 (major).
    const s = summarise({ ...control, 'CI+III': 5 });
    expect(kinds(s)).toEqual(['linked_activity_low']);
    expect(comparison(s, 'CI+III:ratio_cs').band).toBe('major');
    expect(comparison(s, 'CI+III:ratio_cs').bandNote).toBeNull();
    expect(bandNotes(s)).toEqual([]);
  });

  it('an isolated complex I defect accounts for the low CI+III/CS it cites', () => {
    const s = summarise({ ...control, CI: 8, 'CI+III': 10 });
    expect(comparison(s, 'CI+III:ratio_cs').band).toBe('minor');
    expect(comparison(s, 'CI+III:ratio_cs').bandNote).toBeNull();
  });

  it('evidence that is within its interval but in a band still gets its reason', () => {
    // CII/CS interval widened to 0.02–0.28 (invented). CII 8 → CII/CS 0.0533 = 26.7% of 0.2 (minor band, within);
    // CI 3 → CI/CS 0.02 (below) and CI/CII 0.375 (below 0.65): an isolated CI defect citing CII/CS.
    const s = summarise({ ...control, CII: 8, CI: 3 }, { intervals: withInterval('CII', 'ratio_cs', { lower: 0.02 }) });
    expect(kinds(s)).toEqual(['isolated_deficiency']);
    expect(s.findings[0]!.evidence.map(key)).toContain('CII:ratio_cs');
    const c = comparison(s, 'CII:ratio_cs');
    expect(c.position).toBe('within');
    expect(c.band).toBe('minor');
    expect(c.bandNote).toBe(
      'CII/CS (27% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex II: CII/CS is still within its reference interval, so the pattern does not count it as low; the band only describes how far it is from the reference mean',
    );
  });
});

describe('band reasons, further cases', () => {
  it('a major band is explained as a minor one is', () => {
    // No CS; by activity, CI 3 = 8.1% of 37 (major).
    const { CS: _cs, ...rest } = control;
    const s = summarise({ ...rest, CI: 3 }, { criteria: byActivity });
    const c = comparison(s, 'CI:activity');
    expect(c.band).toBe('major');
    expect(c.bandNote).toMatch(/^CI activity \(8\.1% of the reference mean\) is in the major band of the criteria, but the pattern shows no deficiency of complex I: no ratio to citrate synthase could be compared/);
    expect(s.notes).toContain(c.bandNote);
  });

  it('a low activity whose ratio to CS is above its interval: put down to mitochondrial content', () => {
    // By activity: CS 20, CI 10 → CI activity 27.0% of 37 (minor); CI/CS 0.5 > 0.35 (above).
    const s = summarise({ ...control, CS: 20, CI: 10 }, { criteria: byActivity });
    const c = comparison(s, 'CI:activity');
    expect(comparison(s, 'CI:ratio_cs').position).toBe('above');
    expect(c.band).toBe('minor');
    expect(c.bandNote).toContain(
      ': low activity with a normal ratio to citrate synthase: this suggests low mitochondrial content (or a specimen of poor quality), not a respiratory-chain defect',
    );
  });

  it('a ratio to CII in a band with no CS: the plain reason, not a reading of CI/CS', () => {
    // By ratio to CII, no CS: CI 10 → CI/CII 0.333 = 26.7% of 1.25 (minor, below 0.65); CI/CS has no value.
    const { CS: _cs, ...rest } = control;
    const s = summarise({ ...rest, CI: 10 }, { criteria: byRatioCii });
    const c = comparison(s, 'CI:ratio_cii');
    expect(c.band).toBe('minor');
    expect(c.bandNote).toBe(
      'CI/CII (27% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex I: the pattern does not count complex I as deficient',
    );
  });
});

describe('an isolated finding says what it was shown against', () => {
  it('CI/CII without an interval: CI is counted on CI/CS, and the label does not claim a comparison with complex II', () => {
    // The CI/CII interval removed (invented set). CI 8 → CI/CS 0.0533 < 0.15; CII/CS 0.2 within; CI/CII has no
    // interval, so it cannot show the defect or clear it.
    const intervals = demoReferenceIntervals.filter((i) => !(i.assay === 'CI' && i.measure === 'ratio_cii'));
    const s = summarise({ ...control, CI: 8 }, { intervals });
    expect(comparison(s, 'CI:ratio_cii').position).toBeNull();
    expect(kinds(s)).toEqual(['isolated_deficiency']);
    expect(s.findings[0]!.label).toBe(
      'Isolated low complex I activity (low relative to citrate synthase; the ratio to complex II could not be compared)',
    );
  });

  it('CII not measured: the same words', () => {
    const { CII: _cii, ...rest } = control;
    const s = summarise({ ...rest, CI: 20 });
    expect(s.findings[0]!.label).toBe(
      'Isolated low complex I activity (low relative to citrate synthase; the ratio to complex II could not be compared)',
    );
  });

  it('the low-activities note names activities only, not a ratio that was not counted', () => {
    // CI 21: CI activity 21 within 19–55; CI/CS 0.14 below but CI/CII 0.70 within (not counted): every activity
    // is within its interval, so there is no note about low activities.
    const s = summarise({ ...control, CI: 21 });
    expect(kinds(s)).toEqual(['normal']);
    expect(s.notes.filter((n) => /^Activities below their intervals/.test(n))).toEqual([]);
  });
});
