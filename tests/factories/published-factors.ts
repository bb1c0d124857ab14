import type { AssayCode } from '@/schemas/common';

/*
 * Calculation factors of the consensus spectrophotometric methods: activity (nmol·min⁻¹·mg⁻¹) = ΔA/min × factor,
 * for a 1 mL reaction in a 1 cm cuvette holding 40 µg of protein [confirmed: the consensus table's factors,
 * docs/domain.md §1 — CI 4032.3, CII 1308.9, CIII 1801.8 at 30 µg (1351.4 at 40 µg), CIV, CI+III and CII+III
 * 1351.4, CS 1838.2, all at 40 µg]. The literals below are those factors worked out by hand to full precision
 * as 1000 / (ε × 0.040 mg), so that typed rates land on a round activity to many digits; each rounds to the
 * published one-decimal value (checked in tests/unit/server/assay-engine/published-factors.test.ts).
 * They are literals on purpose: a factory that recomputed them from the assay definition would hide a wrong ε
 * or a wrong Beer–Lambert factor in the server.
 */
export const publishedFactorAt40Ug: Readonly<Record<AssayCode, number>> = {
  CI: 4032.258064516129,
  CII: 1308.9005235602092,
  CIII: 1351.3513513513515,
  CIV: 1351.3513513513515,
  'CI+III': 1351.3513513513515,
  'CII+III': 1351.3513513513515,
  CS: 1838.2352941176468,
};

/** The one-decimal factors as printed in the consensus table (CIII converted from 30 µg to 40 µg: 1801.8 × 30/40). */
export const printedFactorAt40Ug: Readonly<Record<AssayCode, number>> = {
  CI: 4032.3,
  CII: 1308.9,
  CIII: 1351.4,
  CIV: 1351.4,
  'CI+III': 1351.4,
  'CII+III': 1351.4,
  CS: 1838.2,
};

/** The cuvettes these factors hold for: 1 mL reaction, 1 cm, and sample volume × protein = 40 µg. */
export function assert40UgCuvette(c: { pathlengthCm: number; reactionVolumeUl: number; sampleVolumeUl: number }, proteinMgPerMl: number) {
  const micrograms = c.sampleVolumeUl * proteinMgPerMl;
  if (c.pathlengthCm !== 1 || c.reactionVolumeUl !== 1000 || Math.abs(micrograms - 40) > 1e-9) {
    throw new Error(`the published factors hold for 1 mL, 1 cm and 40 µg protein, not ${JSON.stringify(c)} with ${proteinMgPerMl} mg/mL`);
  }
}

/**
 * The typed rates that give `activity` for an assay: |ΔA/min| = activity / factor, with the sign the assay's
 * absorbance moves in (falls for CI, CII and CIV; rises for the others [confirmed], docs/domain.md §1) and a zero
 * background where the method subtracts one.
 */
export function typedRates(assay: AssayCode, activity: number) {
  const magnitude = activity / publishedFactorAt40Ug[assay];
  const falls = assay === 'CI' || assay === 'CII' || assay === 'CIV';
  const subtracts = assay !== 'CIV' && assay !== 'CII+III';
  return { totalRatePerMin: falls ? -magnitude : magnitude, backgroundRatePerMin: subtracts ? 0 : null };
}
