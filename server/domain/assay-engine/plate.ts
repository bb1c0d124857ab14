import type {
  AssayDefinition,
  CalculationResult,
  RateWindow,
  TracePoint,
} from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { pathlengthFromFill } from './activity';
import { calculateActivity } from './engine';
import { summariseReplicates, type ReplicateSummary } from './replicates';

/**
 * One specimen × assay × replicate group of plate wells. Structurally the same as MappedTraceGroup in
 * src/schemas/plate.ts, so a mapped plate can be passed straight in.
 */
export interface PlateGroup {
  specimenRef: string;
  assay: AssayCode;
  replicate: number;
  total: readonly TracePoint[];
  background?: readonly TracePoint[];
  blank?: readonly TracePoint[];
}

export type PlatePathlength =
  | { mode: 'given'; cm: number }
  | { mode: 'fill'; volumeUl: number; wellAreaCm2: number };

export interface PlateSettings {
  pathlength: PlatePathlength;
  reactionVolumeUl: number;
  sampleVolumeUl: number;
  /** Homogenate protein by specimen label, mg/mL. */
  proteinMgPerMl: Readonly<Record<string, number>>;
  /** Manual windows by assay; the rest use the automatic window. */
  windows?: Partial<Record<AssayCode, RateWindow>>;
}

export interface PlateAssayResult {
  specimenRef: string;
  assay: AssayCode;
  /** In replicate order. */
  replicates: CalculationResult[];
  summary: ReplicateSummary;
}

export interface PlateResult {
  pathlengthCm: number;
  pathlengthMode: PlatePathlength['mode'];
  /** Specimen × assay, in the order the groups first appear. */
  results: PlateAssayResult[];
}

function platePathlength(p: PlatePathlength): number {
  if (p.mode === 'fill') return pathlengthFromFill(p.volumeUl, p.wellAreaCm2);
  if (!(Number.isFinite(p.cm) && p.cm > 0)) {
    throw new RangeError(`pathlength.cm must be a finite number greater than 0 (got ${String(p.cm)})`);
  }
  return p.cm;
}

/**
 * Every group of a plate through calculateActivity, then the replicates of each specimen × assay
 * summarised. Missing protein or definitions are setup errors and throw, naming what is missing.
 */
export function calculatePlate(
  groups: readonly PlateGroup[],
  settings: PlateSettings,
  definitions: Readonly<Partial<Record<AssayCode, AssayDefinition>>>,
): PlateResult {
  const pathlengthCm = platePathlength(settings.pathlength);
  const bucket = new Map<string, { specimenRef: string; assay: AssayCode; items: { replicate: number; result: CalculationResult }[] }>();
  for (const g of groups) {
    const definition = definitions[g.assay];
    if (!definition) throw new RangeError(`definitions: no assay definition for ${g.assay}`);
    const protein = settings.proteinMgPerMl[g.specimenRef];
    if (protein === undefined || !(Number.isFinite(protein) && protein > 0)) {
      throw new RangeError(
        `proteinMgPerMl: no positive protein concentration for specimen "${g.specimenRef}"`,
      );
    }
    const window = settings.windows?.[g.assay];
    const result = calculateActivity(
      {
        assay: g.assay,
        pathlengthCm,
        reactionVolumeUl: settings.reactionVolumeUl,
        sampleVolumeUl: settings.sampleVolumeUl,
        proteinMgPerMl: protein,
        total: g.total as TracePoint[],
        ...(g.background ? { background: g.background as TracePoint[] } : {}),
        ...(window ? { window } : {}),
      },
      definition,
      g.blank ? { blank: g.blank } : {},
    );
    const key = `${g.specimenRef}\u0000${g.assay}`;
    let entry = bucket.get(key);
    if (!entry) {
      entry = { specimenRef: g.specimenRef, assay: g.assay, items: [] };
      bucket.set(key, entry);
    }
    entry.items.push({ replicate: g.replicate, result });
  }
  const results: PlateAssayResult[] = [];
  for (const entry of bucket.values()) {
    entry.items.sort((a, b) => a.replicate - b.replicate);
    const replicates = entry.items.map((i) => i.result);
    const cvLimit = definitions[entry.assay]!.cvLimitPct;
    results.push({
      specimenRef: entry.specimenRef,
      assay: entry.assay,
      replicates,
      summary: summariseReplicates(
        replicates.map((r) => r.activity),
        cvLimit,
      ),
    });
  }
  return { pathlengthCm, pathlengthMode: settings.pathlength.mode, results };
}
