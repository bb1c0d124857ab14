import { describe, expect, it } from 'vitest';
import {
  assayDefinitionSchema,
  calculationRequestSchema,
  calculationResultSchema,
  comparisonIntervalSchema,
  defaultAssayDefinitions,
  demoReferenceIntervals,
  DEMO_INTERVAL_SET_LABEL,
} from '@/schemas/assay';
import { calculateActivity } from '../../../../server/domain/assay-engine/engine';

const valid = {
  assay: 'CI',
  pathlengthCm: 1,
  reactionVolumeUl: 1000,
  sampleVolumeUl: 20,
  proteinMgPerMl: 2,
  total: [
    { t: 0, a: 0.8 },
    { t: 30, a: 0.79 },
    { t: 60, a: 0.78 },
  ],
};

/** Field path → messages, the way the API's error body reports them. */
function fieldMessages(input: unknown): Record<string, string[]> {
  const r = calculationRequestSchema.safeParse(input);
  if (r.success) return {};
  const out: Record<string, string[]> = {};
  for (const issue of r.error.issues) {
    const key = issue.path.join('.') || '(root)';
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

// Source for this block: the API contract in the issue's item 8 (bad requests fail with a message per
// field) and the rules file ("bad input always gets a clear error that names the field").
describe('calculationRequestSchema', () => {
  it('when the request follows the contract, then it parses', () => {
    expect(calculationRequestSchema.safeParse(valid).success).toBe(true);
  });

  it('when required fields are missing, then each missing field is named', () => {
    const errors = fieldMessages({ assay: 'CI', total: valid.total });
    expect(errors.pathlengthCm).toEqual(['pathlengthCm is required']);
    expect(errors.reactionVolumeUl).toEqual(['reactionVolumeUl is required']);
    expect(errors.sampleVolumeUl).toEqual(['sampleVolumeUl is required']);
    expect(errors.proteinMgPerMl).toEqual(['proteinMgPerMl is required']);
  });

  it('when volumes, protein or pathlength are zero or negative, then each is rejected by name', () => {
    const errors = fieldMessages({
      ...valid,
      pathlengthCm: 0,
      reactionVolumeUl: -1,
      sampleVolumeUl: 0,
      proteinMgPerMl: -0.5,
    });
    expect(errors.pathlengthCm).toEqual(['pathlengthCm must be at least 0.01 cm']);
    expect(errors.reactionVolumeUl).toEqual(['reactionVolumeUl must be at least 1 µL']);
    expect(errors.sampleVolumeUl).toEqual(['sampleVolumeUl must be at least 0.1 µL']);
    expect(errors.proteinMgPerMl).toEqual(['proteinMgPerMl must be at least 0.001 mg/mL']);
  });

  it('when the total or background has fewer than 3 readings, then that trace is named', () => {
    const errors = fieldMessages({
      ...valid,
      total: valid.total.slice(0, 2),
      background: valid.total.slice(0, 1),
    });
    expect(errors.total).toEqual(['total needs at least 3 readings']);
    expect(errors.background).toEqual(['background needs at least 3 readings']);
  });

  it('when the assay is unknown or a field is not in the contract, then the request fails', () => {
    const errors = fieldMessages({ ...valid, assay: 'CV', extra: 1 });
    expect(Object.keys(errors)).toContain('assay');
    expect(errors['(root)']?.join(' ')).toMatch(/extra/);
  });

  it('when a reading is not a number, then its row and field are in the path', () => {
    const errors = fieldMessages({ ...valid, total: [...valid.total, { t: 90, a: 'x' }] });
    expect(errors['total.3.a']).toEqual(['a must be a finite number']);
  });

  it('when the window ends before it starts, then window.toS is named', () => {
    const errors = fieldMessages({ ...valid, window: { fromS: 60, toS: 30 } });
    expect(errors['window.toS']).toEqual(['window.toS must be after window.fromS']);
  });

  it('when the sample volume exceeds the reaction volume, then sampleVolumeUl is named', () => {
    const errors = fieldMessages({ ...valid, sampleVolumeUl: 2000 });
    expect(errors.sampleVolumeUl).toEqual(['sampleVolumeUl cannot exceed reactionVolumeUl']);
  });
});

describe('defaultAssayDefinitions', () => {
  it('when each default is parsed, then it passes its own schema', () => {
    for (const d of defaultAssayDefinitions) expect(assayDefinitionSchema.parse(d)).toEqual(d);
  });

  it('when compared with the consensus table, then wavelength, ε, direction and background match', () => {
    // docs/domain.md §1: wavelengths and subtraction scheme [confirmed] consensus table; ε [derived]
    // from the table's calculation factors.
    const table = {
      CI: [340, 6.2, 'falls', 'inhibitor'],
      CII: [600, 19.1, 'falls', 'baseline'],
      CIII: [550, 18.5, 'rises', 'inhibitor'],
      CIV: [550, 18.5, 'falls', 'none'],
      'CI+III': [550, 18.5, 'rises', 'inhibitor'],
      'CII+III': [550, 18.5, 'rises', 'none'],
      CS: [412, 13.6, 'rises', 'baseline'],
    } as const;
    expect(defaultAssayDefinitions).toHaveLength(7);
    for (const d of defaultAssayDefinitions) {
      expect([d.wavelengthNm, d.epsilonPerMmPerCm, d.direction, d.background]).toEqual(table[d.code]);
      expect(d.version).toBe(1);
      expect(d.epsilonSource.length).toBeGreaterThan(20);
    }
  });

  it('when a definition asks for first order on another complex, then it is rejected', () => {
    const ci = defaultAssayDefinitions[0]!;
    const r = assayDefinitionSchema.safeParse({ ...ci, rateModel: 'first_order' });
    expect(r.success).toBe(false);
  });
});

// Source: the issue's item 7 (one invented, clearly labelled demo set for skeletal muscle).
describe('demoReferenceIntervals', () => {
  it('when listed, then every interval is labelled as invented demo data and valid', () => {
    expect(demoReferenceIntervals.length).toBe(16);
    for (const i of demoReferenceIntervals) {
      expect(i.setLabel).toBe(DEMO_INTERVAL_SET_LABEL);
      expect(i.specimenType).toBe('skeletal_muscle');
      expect(comparisonIntervalSchema.safeParse(i).success).toBe(true);
      expect(i.lower).toBeLessThan(i.mean);
      expect(i.mean).toBeLessThan(i.upper);
    }
  });
});

// Source: the API contract in the issue's item 8 (response fields).
describe('calculationResultSchema', () => {
  it('when the engine answers a valid request, then the answer passes the response schema', () => {
    const ci = defaultAssayDefinitions.find((d) => d.code === 'CI')!;
    const request = calculationRequestSchema.parse(valid);
    expect(calculationResultSchema.safeParse(calculateActivity(request, ci)).success).toBe(true);
  });
});
