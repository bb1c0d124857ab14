import { describe, expect, it } from 'vitest';
import type { ReportResult } from '@/schemas/report-document';
import { proposeInterpretation } from '../../../../server/modules/review/draft-interpretation';

/*
 * The proposed interpretation the director sees on the review page: its percentages never contradict their
 * band, and a band the pattern does not reflect comes with its reason. Bands: Bernier FP et al., Neurology
 * 2002;59:1406–1411 [from memory], tissue major < 20%, minor 20–30% of the reference mean. Values invented.
 */

function ratio(assay: ReportResult['assay'], measure: ReportResult['measure'], value: number, mean: number, lower: number, extra: Partial<ReportResult> = {}): ReportResult {
  const pct = (100 * value) / mean;
  return {
    assay,
    assayName: assay,
    measure,
    value,
    unit: 'ratio',
    referenceLower: lower,
    referenceUpper: mean * 2 - lower,
    referenceMean: mean,
    intervalLabel: 'Muscle (demo)',
    intervalVersion: 1,
    status: value < lower ? 'below' : 'within',
    pctOfMean: pct,
    criterionBand: measure === 'ratio_cs' ? (pct < 20 ? 'major' : pct < 30 ? 'minor' : null) : null,
    pctThresholds: [20, 30],
    flags: [],
    ...extra,
  };
}

describe('proposeInterpretation', () => {
  it('when CI/CS is 19.96% of its mean (major band), then the proposal prints 19.96%, not a rounded 20%', () => {
    // 0.0499 / 0.25 = 19.96% [derived]; CI/CII 0.2525 / 1.25 = 20.2% (no band: the rule applies to the ratio to CS).
    const text = proposeInterpretation({
      specimenType: 'skeletal_muscle',
      accepted: true,
      rejectionReason: null,
      results: [ratio('CI', 'ratio_cs', 0.0499, 0.25, 0.15), ratio('CI', 'ratio_cii', 0.2525, 1.25, 0.65), ratio('CII', 'ratio_cs', 0.2, 0.2, 0.12)],
      findings: [{ kind: 'isolated_deficiency', label: 'Isolated low complex I activity', complexes: ['CI'] }],
      criteriaLabel: 'Bernier FP et al. 2002',
    });
    expect(text).toContain('relative to citrate synthase it is 19.96% of the reference mean (below its reference interval, in the major-criterion band)');
    expect(text).toContain('relative to complex II it is 20% of the reference mean (below its reference interval)');
  });

  it('when a band stands that the pattern does not reflect, then the proposal gives the reason', () => {
    const note =
      'CIII/CS (27% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex III: CIII/CS is still within its reference interval, so the pattern does not count it as low';
    const text = proposeInterpretation({
      specimenType: 'skeletal_muscle',
      accepted: true,
      rejectionReason: null,
      results: [ratio('CIII', 'ratio_cs', 0.216, 0.8, 0.1, { criterionBandNote: note })],
      findings: [{ kind: 'normal', label: 'No deficiency pattern', complexes: [] }],
      criteriaLabel: 'Bernier FP et al. 2002',
    });
    expect(text).toContain(`${note}.`);
    expect(text).toMatch(/Criterion bands refer to the enzyme criteria of Bernier FP et al\. 2002/);
  });
});
