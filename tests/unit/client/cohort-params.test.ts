import { describe, expect, it } from 'vitest';
import { cohortFormResolver, cohortQueryString, formValuesOf, readCohortParams, type CohortFormValues } from '@/features/registry/utils/cohort-params';

/*
 * The cohort page's form and address bar speak the query string the server reads (src/schemas/registry.ts).
 * Expected strings and messages are written by hand from the filter's documented form (docs/api.md, Cohorts).
 */
const blank: CohortFormValues = { pattern: '', complex: '', specimenType: '', ageBand: '', sex: '', signedFrom: '', signedTo: '', ranges: [] };

describe('cohort form and address bar', () => {
  it('turns the form into the criteria, dropping "any" and writing ranges as tokens', () => {
    const out = cohortFormResolver({ ...blank, pattern: 'isolated', ranges: [{ assay: 'CIV', measure: 'ratio_cs', scale: 'pct', min: '', max: ' 50 ' }] });
    expect(out.errors).toEqual({});
    expect(out.values).toEqual({ pattern: 'isolated', range: ['CIV:ratio_cs:pct::50'] });
    expect(cohortQueryString(out.values as object)).toBe('pattern=isolated&range=CIV%3Aratio_cs%3Apct%3A%3A50');
  });

  it('puts a range’s message on its own row and control, without the token prefix', () => {
    const out = cohortFormResolver({
      ...blank,
      ranges: [
        { assay: 'CI', measure: 'activity', scale: 'value', min: '1', max: '2' },
        { assay: 'CI', measure: 'ratio_cs', scale: 'pct', min: '60', max: '40' },
      ],
    });
    expect(out.values).toEqual({});
    const rows = (out.errors as { ranges: ({ max?: { message: string } } | undefined)[] }).ranges;
    expect(rows[0]).toBeUndefined();
    expect(rows[1]!.max!.message).toBe('Highest value is below the lowest');
  });

  it('names a date range the wrong way round on "Signed to"', () => {
    const out = cohortFormResolver({ ...blank, signedFrom: '2025-06-01', signedTo: '2025-01-01' });
    expect(Object.keys(out.errors)).toEqual(['signedTo']);
  });

  it('reads repeated ranges back from the address bar, and a bad link falls back to no filter with the reason', () => {
    const good = readCohortParams(new URLSearchParams('sex=female&range=CI:ratio_cs:pct::40&range=CS:activity:value:100:&page=2'));
    expect(good).toEqual({ filter: { sex: 'female', range: ['CI:ratio_cs:pct::40', 'CS:activity:value:100:'], page: 2 }, problem: null });
    expect(formValuesOf(good.filter).ranges).toEqual([
      { assay: 'CI', measure: 'ratio_cs', scale: 'pct', min: '', max: '40' },
      { assay: 'CS', measure: 'activity', scale: 'value', min: '100', max: '' },
    ]);
    const bad = readCohortParams(new URLSearchParams('ageBand=ancient'));
    expect(bad.filter).toEqual({});
    expect(bad.problem).toMatch(/ageBand/);
  });
});
