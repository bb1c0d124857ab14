/*
 * Beer–Lambert: A = ε·c·l (IUPAC Gold Book, doi:10.1351/goldbook.B00626) [confirmed]. With ε in
 * mM⁻¹·cm⁻¹, a slope in absorbance per minute becomes mM/min = µmol/mL/min in the cuvette; × 1000
 * gives nmol/mL/min, × V_reaction/V_sample gives per mL of sample, ÷ protein (mg/mL) gives per mg:
 *
 *   activity = |ΔA/min| × V_reaction × 1000 / (ε × l × V_sample × protein)   [derived, docs/domain.md §1]
 */

export interface ActivityInputs {
  epsilonPerMmPerCm: number;
  pathlengthCm: number;
  /** Any volume unit, the same for both. */
  reactionVolume: number;
  sampleVolume: number;
  proteinMgPerMl: number;
}

/** nmol/min/mg protein per unit of ΔA/min. */
export function activityFactor(i: ActivityInputs): number {
  return (
    (i.reactionVolume * 1000) /
    (i.epsilonPerMmPerCm * i.pathlengthCm * i.sampleVolume * i.proteinMgPerMl)
  );
}

/** Specific activity, nmol/min/mg protein, from a specific slope in absorbance units per minute. */
export function specificActivity(specificSlopePerMin: number, i: ActivityInputs): number {
  return Math.abs(specificSlopePerMin) * activityFactor(i);
}

/**
 * Geometric pathlength of a plate well, cm: fill volume (µL = mm³ → /1000 for cm³) over the well's
 * cross-section (cm²). A 96-well flat well of about 0.32 cm² filled with 200 µL gives about 0.6 cm
 * [from memory, docs/domain.md §1]; the meniscus makes the true value a little different, so a lab may
 * enter a measured pathlength instead.
 */
export function pathlengthFromFill(volumeUl: number, wellAreaCm2: number): number {
  if (!(Number.isFinite(volumeUl) && volumeUl > 0)) {
    throw new RangeError(`volumeUl must be a finite number greater than 0 (got ${String(volumeUl)})`);
  }
  if (!(Number.isFinite(wellAreaCm2) && wellAreaCm2 > 0)) {
    throw new RangeError(
      `wellAreaCm2 must be a finite number greater than 0 (got ${String(wellAreaCm2)})`,
    );
  }
  return volumeUl / 1000 / wellAreaCm2;
}
