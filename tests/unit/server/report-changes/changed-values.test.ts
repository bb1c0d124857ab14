import { describe, expect, it } from 'vitest';
import type { ReportDocument } from '@/schemas/report-document';
import { changedValuesBetween } from '../../../../server/domain/report-changes';
import { buildReportDocument, buildTwoSpecimenReportDocument, withResultRow } from '../../../factories/report-document';

/*
 * What a corrected report lists as changed. Rule checked: CLIA 42 CFR 493.1291(k) [confirmed] asks that a
 * corrected report be identified and the error put right; Cristae says which printed values changed, so the
 * comparison is on the values as printed. The expected strings follow from the demo rows' own fixed decimals
 * (one decimal for activities in the factory) [derived], not from the code under test.
 */

type Doc = ReportDocument;

const withRow = withResultRow;

describe('changedValuesBetween', () => {
  const v1 = buildReportDocument();

  it('when nothing changed, then nothing is listed', () => {
    expect(changedValuesBetween(v1, structuredClone(v1))).toEqual([]);
  });

  it('when an activity was mistyped (CIV 85.2 → 58.2), then its value is listed from what to what, and nothing else about other rows', () => {
    const v2 = withRow(v1, 0, 'CIV', 'activity', (r) => ({ ...r, value: 58.2, status: 'within' }));
    const changes = changedValuesBetween(v1, v2);
    expect(changes[0]).toEqual({ specimen: null, item: 'CIV activity', before: '85.2 nmol/min/mg protein', after: '58.2 nmol/min/mg protein' });
    expect(changes.every((c) => c.item.startsWith('CIV activity'))).toBe(true);
  });

  it('when a value differs only below the printed precision (9.5 and 9.54 both print 9.5), then it is not announced', () => {
    const v2 = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, value: 9.54 }));
    expect(changedValuesBetween(v1, v2)).toEqual([]);
  });

  it('when a criterion band, the comparison and the % of mean change, then each is its own line in words', () => {
    // The demo CI ratio to CII is 0.21 against a mean of 0.8: 26% of the mean, in the 20–30% minor band [derived].
    const v2 = withRow(v1, 0, 'CI', 'ratio_cii', (r) => ({ ...r, value: 0.8, pctOfMean: 100, status: 'within', criterionBand: null }));
    const items = changedValuesBetween(v1, v2);
    expect(items.find((c) => c.item === 'CI ratio to CII: criterion band')).toEqual({
      specimen: null,
      item: 'CI ratio to CII: criterion band',
      before: 'minor-criterion band',
      after: 'None',
    });
    expect(items.find((c) => c.item === 'CI ratio to CII: compared with interval')).toMatchObject({ before: 'Below interval', after: 'Within interval' });
    expect(items.find((c) => c.item === 'CI ratio to CII: % of ref. mean')?.after).toBe('100%');
  });

  it('when a row is no longer reported, then it is said once, on its value line', () => {
    const v2 = withRow(v1, 0, 'CS', 'activity', () => null);
    expect(changedValuesBetween(v1, v2)).toEqual([{ specimen: null, item: 'CS activity', before: '145.7 nmol/min/mg protein', after: 'Not reported' }]);
  });

  it('when the pattern summary changes, then it is listed as the pattern', () => {
    const v2 = structuredClone(v1);
    v2.specimens[0]!.patternSummary = 'No deficiency pattern (demo).';
    expect(changedValuesBetween(v1, v2)).toEqual([
      { specimen: null, item: 'Pattern', before: v1.specimens[0]!.patternSummary, after: 'No deficiency pattern (demo).' },
    ]);
  });

  it('when a case has two specimens, then each change names its specimen', () => {
    const two = buildTwoSpecimenReportDocument();
    const v2 = withRow(two, 1, 'CIV', 'activity', (r) => ({ ...r, value: 71.9 }));
    const [first] = changedValuesBetween(two, v2);
    expect(first).toEqual({ specimen: 'B', item: 'CIV activity', before: '17.9 nmol/min/mg protein', after: '71.9 nmol/min/mg protein' });
  });

  it('when the superseded version was stored in the older one-specimen shape, then it is still compared', () => {
    const [section] = v1.specimens;
    const { specimens: _omit, ...rest } = v1;
    const legacy = { ...rest, specimen: section!.specimen, results: section!.results, patternSummary: section!.patternSummary } as unknown as Doc;
    const v2 = withRow(v1, 0, 'CIV', 'activity', (r) => ({ ...r, value: 58.2 }));
    expect(changedValuesBetween(legacy, v2)[0]).toMatchObject({ item: 'CIV activity', before: '85.2 nmol/min/mg protein', after: '58.2 nmol/min/mg protein' });
  });
});
