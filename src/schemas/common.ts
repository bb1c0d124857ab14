import { z } from 'zod';

/** Respiratory-chain assays and citrate synthase, by their trade abbreviations. */
export const assayCodes = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS'] as const;
export const assayCodeSchema = z.enum(assayCodes);
export type AssayCode = z.infer<typeof assayCodeSchema>;

/** The quantity a reference interval and a comparison are about. */
export const measures = ['activity', 'ratio_cs', 'ratio_cii'] as const;
export const measureSchema = z.enum(measures);
export type Measure = z.infer<typeof measureSchema>;

export const specimenTypes = [
  'skeletal_muscle',
  'liver',
  'heart_muscle',
  'fibroblasts',
  'lymphoblasts',
  'other',
] as const;
export const specimenTypeSchema = z.enum(specimenTypes);
export type SpecimenType = z.infer<typeof specimenTypeSchema>;

export const specimenTypeLabels: Record<SpecimenType, string> = {
  skeletal_muscle: 'Skeletal muscle',
  liver: 'Liver',
  heart_muscle: 'Heart muscle',
  fibroblasts: 'Cultured skin fibroblasts',
  lymphoblasts: 'Lymphoblasts',
  other: 'Other',
};

/** Cultured cells are judged against the cell-line thresholds of the diagnostic criteria. */
export function specimenClassOf(type: SpecimenType): 'tissue' | 'cell_line' {
  return type === 'fibroblasts' || type === 'lymphoblasts' ? 'cell_line' : 'tissue';
}

export const roles = ['technologist', 'director', 'clinician', 'admin'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

export const idParamsSchema = z.object({ id: z.coerce.number().int().positive() });
