import { describe, expect, it } from 'vitest';
import type { ReportDocument, ReportSpecimenSection } from '@/schemas/report-document';
import { changedValuesBetween } from '../../../../server/domain/report-changes';
import { buildReportDocument, liverSection, muscleSection, withResultRow } from '../../../factories/report-document';

/*
 * More of what a corrected report lists as changed (CLIA 42 CFR 493.1291(k) [confirmed]: a corrected report is
 * identified and the error put right; Cristae lists every printed value that differs, compared as printed).
 * The printing rule compared against is the report's stated one (docs/api.md, report PDF): fixed decimals from
 * the assay definition, and a number is never printed across the reference limit or criterion threshold that
 * decided its status, so 13.96 under a lower limit of 14 prints "13.96", not "14.0". Expected strings are worked
 * out by hand from that rule and the demo rows (tests/factories/report-document.ts: one decimal for activities,
 * muscle CI activity 9.5 against 14.0–48.0 with mean 28.0), never taken from the code under test.
 */

type Doc = ReportDocument;

const withRow = withResultRow;

const withSpecimens = (sections: ReportSpecimenSection[]): Doc => ({ ...structuredClone(buildReportDocument()), specimens: sections });
const labelled = (s: ReportSpecimenSection, label: string | undefined): ReportSpecimenSection => ({
  ...s,
  specimen: { ...s.specimen, label },
});

describe('changedValuesBetween: values as printed', () => {
  const v1 = buildReportDocument();

  it('when a value just under its lower limit moves by less than the usual rounding, then the change is seen (13.96 → 13.97)', () => {
    const a = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, value: 13.96 }));
    const b = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, value: 13.97 }));
    expect(changedValuesBetween(a, b)).toEqual([
      { specimen: null, item: 'CI activity', before: '13.96 nmol/min/mg protein', after: '13.97 nmol/min/mg protein' },
    ]);
  });

  it('when a value just over its upper limit moves a little, then the change is seen (48.04 → 48.03)', () => {
    const a = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, value: 48.04, status: 'above' }));
    const b = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, value: 48.03, status: 'above' }));
    expect(changedValuesBetween(a, b)[0]).toMatchObject({ before: '48.04 nmol/min/mg protein', after: '48.03 nmol/min/mg protein' });
  });

  it('when a % of the mean just under a criterion threshold moves a little, then it is seen (19.96% → 19.97%)', () => {
    const a = withRow(v1, 0, 'CI', 'ratio_cs', (r) => ({ ...r, pctOfMean: 19.96, pctThresholds: [20, 30] }));
    const b = withRow(v1, 0, 'CI', 'ratio_cs', (r) => ({ ...r, pctOfMean: 19.97, pctThresholds: [20, 30] }));
    expect(changedValuesBetween(a, b)).toEqual([
      { specimen: null, item: 'CI ratio to CS: % of ref. mean', before: '19.96%', after: '19.97%' },
    ]);
  });

  it('when a value is withdrawn, then it reads "No value"; a % of the mean withdrawn reads "None"', () => {
    const v2 = withRow(v1, 0, 'CII', 'activity', (r) => ({ ...r, value: null, status: 'not_compared', pctOfMean: null, criterionBand: null }));
    expect(changedValuesBetween(v1, v2)).toEqual([
      { specimen: null, item: 'CII activity', before: '42.3 nmol/min/mg protein', after: 'No value' },
      { specimen: null, item: 'CII activity: % of ref. mean', before: '94%', after: 'None' },
      { specimen: null, item: 'CII activity: compared with interval', before: 'Within interval', after: 'Not compared' },
    ]);
  });

  it('when a band appears, then it reads from "None" to the band in words', () => {
    const v2 = withRow(v1, 0, 'CI', 'ratio_cs', (r) => ({ ...r, criterionBand: 'major' }));
    expect(changedValuesBetween(v1, v2)).toEqual([
      { specimen: null, item: 'CI ratio to CS: criterion band', before: 'None', after: 'major-criterion band' },
    ]);
  });

  it('when the reference interval changes, then it is listed with both limits and the mean, and a one-sided interval in words', () => {
    const v2 = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, referenceLower: 12, referenceUpper: null, referenceMean: 26 }));
    expect(changedValuesBetween(v1, v2)).toEqual([
      { specimen: null, item: 'CI activity: reference interval', before: '14.0\u201348.0 (28.0)', after: '12.0 or more (26.0)' },
    ]);
    const v3 = withRow(v1, 0, 'CI', 'activity', (r) => ({ ...r, referenceLower: null, referenceUpper: 40, referenceMean: null }));
    expect(changedValuesBetween(v1, v3)[0]).toMatchObject({ after: 'up to 40.0' });
  });

  it('when a row is newly reported, then it is said once, from "Not reported", after the rows both versions have', () => {
    const v0 = withRow(v1, 0, 'CS', 'activity', () => null);
    expect(changedValuesBetween(v0, v1)).toEqual([
      { specimen: null, item: 'CS activity', before: 'Not reported', after: '145.7 nmol/min/mg protein' },
    ]);
  });

  it('when two rows change, then they are listed in the order the new version prints them, with a removed row last', () => {
    let v2 = withRow(v1, 0, 'CIV', 'activity', (r) => ({ ...r, value: 80.1 }));
    v2 = withRow(v2, 0, 'CI', 'activity', (r) => ({ ...r, value: 9.9 }));
    v2 = withRow(v2, 0, 'CII', 'ratio_cs', () => null);
    expect(changedValuesBetween(v1, v2).map((c) => c.item)).toEqual(['CI activity', 'CIV activity', 'CII ratio to CS']);
  });

  it('when the pattern summary appears or goes, then "None" stands for the missing side', () => {
    const none = structuredClone(v1);
    none.specimens[0]!.patternSummary = null;
    expect(changedValuesBetween(none, v1)).toEqual([{ specimen: null, item: 'Pattern', before: 'None', after: v1.specimens[0]!.patternSummary }]);
    expect(changedValuesBetween(v1, none)).toEqual([{ specimen: null, item: 'Pattern', before: v1.specimens[0]!.patternSummary, after: 'None' }]);
  });
});

describe('changedValuesBetween: matching specimens', () => {
  it('matches labelled specimens by label even when their order changes', () => {
    const a = withSpecimens([labelled(muscleSection(), 'A'), liverSection()]);
    const b = withSpecimens([liverSection(), labelled(muscleSection(), 'A')]);
    expect(changedValuesBetween(a, b)).toEqual([]);
  });

  it('matches unlabelled specimens by position and names them 1, 2 when there are several', () => {
    const a = withSpecimens([labelled(muscleSection(), undefined), labelled(liverSection(), undefined)]);
    const b = withRow(a, 1, 'CI', 'activity', (r) => ({ ...r, value: 30 }));
    expect(changedValuesBetween(a, b)).toEqual([
      { specimen: '2', item: 'CI activity', before: '21.4 nmol/min/mg protein', after: '30.0 nmol/min/mg protein' },
    ]);
  });

  it('when a specimen is dropped from the new version, then its rows are listed as no longer reported, under its label', () => {
    const a = withSpecimens([labelled(muscleSection(), 'A'), liverSection()]);
    const b = withSpecimens([labelled(muscleSection(), 'A')]);
    const changes = changedValuesBetween(a, b);
    expect(changes.every((c) => c.specimen === 'B')).toBe(true);
    expect(changes[0]).toEqual({ specimen: 'B', item: 'CI activity', before: '21.4 nmol/min/mg protein', after: 'Not reported' });
    // Eight liver rows, each once on its value line, and its pattern.
    expect(changes).toHaveLength(9);
    expect(changes.at(-1)).toMatchObject({ item: 'Pattern', after: 'None' });
  });

  it('when a specimen is added, then its rows are listed from "Not reported"', () => {
    const a = withSpecimens([labelled(muscleSection(), 'A')]);
    const b = withSpecimens([labelled(muscleSection(), 'A'), liverSection()]);
    const changes = changedValuesBetween(a, b);
    expect(changes[0]).toEqual({ specimen: 'B', item: 'CI activity', before: 'Not reported', after: '21.4 nmol/min/mg protein' });
    expect(changes.filter((c) => c.specimen === 'A')).toEqual([]);
  });

  it('when a stored document has no specimen in either shape, then everything of the new version is new', () => {
    const { specimens: _omit, ...rest } = buildReportDocument();
    const empty = rest as unknown as Doc;
    const v1 = buildReportDocument();
    const changes = changedValuesBetween(empty, v1);
    expect(changes).toHaveLength(v1.specimens[0]!.results.length + 1);
    expect(changes.every((c) => c.specimen === null && (c.before === 'Not reported' || c.item === 'Pattern'))).toBe(true);
  });

  it('when an older one-specimen document has no results or pattern stored, then they count as none', () => {
    const v1 = buildReportDocument();
    const { specimens: _omit, ...rest } = v1;
    const bare = { ...rest, specimen: v1.specimens[0]!.specimen } as unknown as Doc;
    const changes = changedValuesBetween(bare, v1);
    expect(changes[0]).toMatchObject({ before: 'Not reported' });
    expect(changes.at(-1)).toEqual({ specimen: null, item: 'Pattern', before: 'None', after: v1.specimens[0]!.patternSummary });
  });

  it('when an older one-specimen document is compared with the same values in today\'s shape, then nothing is listed, the pattern included', () => {
    const v1 = buildReportDocument();
    const { specimens: _omit, ...rest } = v1;
    const section = v1.specimens[0]!;
    const legacy = { ...rest, specimen: section.specimen, results: section.results, patternSummary: section.patternSummary } as unknown as Doc;
    expect(changedValuesBetween(legacy, v1)).toEqual([]);
  });

  it('when a stored document has no specimen and the new one has labelled specimens, then each new specimen is listed under its label', () => {
    const { specimens: _omit, ...rest } = buildReportDocument();
    const next = withSpecimens([labelled(muscleSection(), 'A'), liverSection()]);
    const changes = changedValuesBetween(rest as unknown as Doc, next);
    expect(new Set(changes.map((c) => c.specimen))).toEqual(new Set(['A', 'B']));
    expect(changes.filter((c) => c.item !== 'Pattern').every((c) => c.before === 'Not reported')).toBe(true);
  });
});
