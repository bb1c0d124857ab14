/*
 * A typed-in reference-interval draft (the body of POST /api/reference-intervals): invented numbers for a test,
 * CIII activity in liver, all ages, from 1 March 2025, unless the test says otherwise.
 */
export function buildIntervalDraft(overrides: Record<string, unknown> = {}) {
  return {
    setName: 'Test set (fictitious)',
    assay: 'CIII',
    measure: 'activity',
    specimenType: 'liver',
    ageBand: { label: 'All ages', minYears: 0, maxYears: null },
    lower: 50,
    upper: 150,
    mean: 100,
    sd: 25,
    n: 40,
    method: 'mean2sd',
    sourceNote: 'Typed in for a test; invented numbers',
    effectiveFrom: '2025-03-01',
    effectiveTo: null,
    ...overrides,
  };
}
