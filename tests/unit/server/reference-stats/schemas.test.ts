import { describe, expect, it } from 'vitest';
import {
  createReferenceIntervalInputSchema,
  referenceIntervalSchema,
  updateReferenceIntervalInputSchema,
  verificationRequestSchema,
} from '@/schemas/reference-interval';

// Invented interval for a fictitious laboratory.
const input = {
  assay: 'CIV',
  measure: 'ratio_cs',
  specimenType: 'skeletal_muscle',
  ageBand: { label: '1–18 years', minYears: 1, maxYears: 18 },
  lower: 0.6,
  upper: 2.1,
  mean: 1.2,
  sd: 0.35,
  n: 42,
  method: 'robust',
  sourceNote: 'Demo controls of the fictitious Harbourside laboratory, 2024 series',
  effectiveFrom: '2025-01-01',
  effectiveTo: null,
} as const;

function issuePaths(result: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) {
  return result.error?.issues.map((i) => i.path.join('.')) ?? [];
}

describe('reference interval schemas', () => {
  it('accept a complete create input and a stored interval built from it', () => {
    expect(createReferenceIntervalInputSchema.safeParse(input).success).toBe(true);
    const stored = { ...input, id: 7, version: 2, status: 'approved', approvedBy: 3, approvedAt: '2025-01-02T09:30:00Z' };
    expect(referenceIntervalSchema.parse(stored)).toEqual(stored);
  });

  it('point at upper when the limits are out of order and at effectiveTo when the dates are', () => {
    const result = createReferenceIntervalInputSchema.safeParse({ ...input, lower: 2.1, upper: 0.6, effectiveTo: '2024-12-31' });
    expect(issuePaths(result).sort()).toEqual(['effectiveTo', 'upper']);
  });

  it('point at ageBand.maxYears when the band is empty', () => {
    const result = createReferenceIntervalInputSchema.safeParse({ ...input, ageBand: { label: 'x', minYears: 18, maxYears: 18 } });
    expect(issuePaths(result)).toEqual(['ageBand.maxYears']);
  });

  it('let an update carry any subset of fields but still check a pair given together', () => {
    expect(updateReferenceIntervalInputSchema.safeParse({}).success).toBe(true);
    expect(updateReferenceIntervalInputSchema.safeParse({ sourceNote: 'Revised' }).success).toBe(true);
    expect(issuePaths(updateReferenceIntervalInputSchema.safeParse({ lower: 3, upper: 1 }))).toEqual(['upper']);
  });

  it('require 20 local values for a verification [confirmed: EP28-A3c]', () => {
    const result = verificationRequestSchema.safeParse({ lower: 1, upper: 2, values: Array(19).fill(1.5) });
    expect(issuePaths(result)).toEqual(['values']);
  });
});
