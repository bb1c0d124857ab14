import type { AssayDefinition, CalculationResult } from '@/schemas/assay';
import type { StoredInputs } from '@/schemas/measurement';
import { calculateActivity, calculateActivityFromRates } from '../../domain/assay-engine/engine';
import { firstNonFinite } from '../../domain/assay-engine/finite';
import { badInput } from '../../lib/errors';

/**
 * One measurement through the assay engine from what was stored with it: typed rates by the rate helper,
 * pasted readings and plate wells by the trace engine (a plate blank is subtracted as the engine says).
 */
export function computeFromInputs(inputs: StoredInputs, definition: AssayDefinition): CalculationResult {
  return requireFinite(computeUnchecked(inputs, definition));
}

/** Refuses (400, naming the value) a result holding NaN or ±Infinity, so none is ever stored. */
export function requireFinite<T>(result: T): T {
  const where = firstNonFinite(result);
  if (where) {
    throw badInput(
      { [where]: `The calculation gave a number that is not finite (${where}); check the readings, volumes and protein` },
      'The inputs lead to a number that cannot be stored',
    );
  }
  return result;
}

function computeUnchecked(inputs: StoredInputs, definition: AssayDefinition): CalculationResult {
  const conditions = {
    assay: definition.code,
    pathlengthCm: inputs.pathlengthCm,
    reactionVolumeUl: inputs.reactionVolumeUl,
    sampleVolumeUl: inputs.sampleVolumeUl,
    proteinMgPerMl: inputs.proteinMgPerMl,
  };
  switch (inputs.mode) {
    case 'rates':
      return calculateActivityFromRates(
        { ...conditions, totalRatePerMin: inputs.totalRatePerMin, backgroundRatePerMin: inputs.backgroundRatePerMin },
        definition,
      );
    case 'traces':
      return calculateActivity(
        {
          ...conditions,
          total: inputs.total,
          ...(inputs.background ? { background: inputs.background } : {}),
          ...(inputs.window ? { window: inputs.window } : {}),
        },
        definition,
      );
    case 'plate':
      return calculateActivity(
        {
          ...conditions,
          total: inputs.total,
          ...(inputs.background ? { background: inputs.background } : {}),
          ...(inputs.window ? { window: inputs.window } : {}),
        },
        definition,
        inputs.blank ? { blank: inputs.blank } : {},
      );
  }
}

/** A short account of a measurement for the audit trail (the readings themselves stay on the row). */
export function auditSummary(m: {
  specimenId: number;
  assay: string;
  replicate: number;
  inputs: StoredInputs;
  result: CalculationResult;
  definitionVersion: number;
}): Record<string, unknown> {
  const base = {
    specimenId: m.specimenId,
    assay: m.assay,
    replicate: m.replicate,
    inputMode: m.inputs.mode,
    proteinMgPerMl: m.inputs.proteinMgPerMl,
    pathlengthCm: m.inputs.pathlengthCm,
    reactionVolumeUl: m.inputs.reactionVolumeUl,
    sampleVolumeUl: m.inputs.sampleVolumeUl,
    definitionVersion: m.definitionVersion,
    specificSlopePerMin: m.result.specificSlopePerMin,
    activity: m.result.activity,
    flags: m.result.flags.map((f) => f.code),
  };
  if (m.inputs.mode === 'rates') {
    return { ...base, totalRatePerMin: m.inputs.totalRatePerMin, backgroundRatePerMin: m.inputs.backgroundRatePerMin };
  }
  return {
    ...base,
    window: m.result.window,
    windowAuto: m.result.windowAuto,
    readings: m.inputs.total.length,
    ...(m.inputs.mode === 'plate' ? { uploadId: m.inputs.uploadId, wells: m.inputs.wells } : {}),
  };
}

/** The entries of two audit summaries that differ: `before` and `after` hold only those keys. */
export function changedValues(
  before: Record<string, unknown>,
  after: Record<string, unknown>,
): { before: Record<string, unknown>; after: Record<string, unknown> } {
  const out = { before: {} as Record<string, unknown>, after: {} as Record<string, unknown> };
  for (const key of new Set([...Object.keys(before), ...Object.keys(after)])) {
    if (JSON.stringify(before[key] ?? null) === JSON.stringify(after[key] ?? null)) continue;
    out.before[key] = before[key] ?? null;
    out.after[key] = after[key] ?? null;
  }
  return out;
}
