import {
  FIRST_ORDER_UNIT,
  type AssayDefinition,
  type FirstOrderResult,
  type Flag,
  type RateWindow,
  type TracePoint,
} from '@/schemas/assay';
import { fitTrace, type RateSettings, type WindowChoice } from './rates';
import { checkTrace, fmt, indexRange, type TraceLabel } from './trace';

/*
 * Complex IV is first order in reduced cytochrome c (Clin Sci 2016;130:393–407 [confirmed]). The
 * apparent rate constant k = [ln(A₀ − A∞) − ln(Aₜ − A∞)] / t (Wharton & Tzagoloff, Methods Enzymol
 * 1967 [from memory]) is taken here as minus the least-squares slope of ln|A − A∞| against time, so
 * every reading in the window counts, not only the two ends.
 */

export interface FirstOrderInputs {
  total: readonly TracePoint[];
  background?: readonly TracePoint[];
  /** Fully oxidised absorbance, read after the reaction (e.g. after ferricyanide). */
  aInfinity: number;
  window?: RateWindow;
  reactionVolumeUl: number;
  sampleVolumeUl: number;
  proteinMgPerMl: number;
}

/**
 * Maps readings to ln|A − A∞|. A manual window must lie wholly on one side of A∞ (a reading at or past
 * it has no logarithm and is flagged by name); the automatic choice stops at the first such reading,
 * since readings that reached the end point carry no rate.
 */
function logTrace(
  trace: readonly TracePoint[],
  aInfinity: number,
  label: TraceLabel,
  choice: WindowChoice,
  flags: Flag[],
): { logged: TracePoint[]; choice: WindowChoice } | null {
  const { lo, hi } =
    choice.kind === 'manual' ? indexRange(trace, choice.window) : { lo: 0, hi: trace.length - 1 };
  const logged: TracePoint[] = [];
  const first = trace[lo];
  const side = first ? Math.sign(first.a - aInfinity) : 0;
  for (let i = lo; i <= hi; i += 1) {
    const p = trace[i]!;
    const d = p.a - aInfinity;
    if (side === 0 || Math.sign(d) !== side) {
      if (choice.kind !== 'manual' && i > lo) break;
      flags.push({
        code: 'PAST_END_POINT',
        message: `${label} trace, reading ${i + 1} (t = ${fmt(p.t)} s): absorbance ${fmt(p.a)} is at or past the end-point absorbance A∞ = ${fmt(aInfinity)}, so ln|A − A∞| is undefined`,
      });
      return null;
    }
    logged.push({ t: p.t, a: Math.log(Math.abs(d)) });
  }
  // A manual window is passed on as it is: it holds every logged reading, and its flags name its times.
  return { logged, choice };
}

function fitK(
  trace: readonly TracePoint[],
  label: TraceLabel,
  inputs: FirstOrderInputs,
  settings: RateSettings,
  choice: WindowChoice,
  checkR2: boolean,
  flags: Flag[],
): { k: number; r2: number; window: RateWindow } | null {
  if (!checkTrace(trace, label, flags)) return null;
  if (!Number.isFinite(inputs.aInfinity)) {
    flags.push({ code: 'NON_FINITE', message: `aInfinity is not a finite number (${String(inputs.aInfinity)})` });
    return null;
  }
  const log = logTrace(trace, inputs.aInfinity, label, choice, flags);
  if (!log) return null;
  // Logarithms have no linear range: the raw readings in the fitted window are checked below.
  const line = fitTrace(
    log.logged,
    label,
    { ...settings, linearRangeMin: Number.NEGATIVE_INFINITY, linearRangeMax: Number.POSITIVE_INFINITY },
    log.choice,
    // Residual SDs of a log trace are not absorbances: the reading-noise floor does not apply.
    { checkR2, checkOutliers: false },
    flags,
  );
  if (!line) return null;
  for (let i = 0; i < trace.length; i += 1) {
    const p = trace[i]!;
    if (p.t < line.fromS || p.t > line.toS) continue;
    if (p.a < settings.linearRangeMin || p.a > settings.linearRangeMax) {
      flags.push({
        code: 'OUT_OF_LINEAR_RANGE',
        message: `${label} trace, reading ${i + 1} (t = ${fmt(p.t)} s): absorbance ${fmt(p.a)} is outside the linear range ${fmt(settings.linearRangeMin)}–${fmt(settings.linearRangeMax)}`,
      });
      break;
    }
  }
  // slopePerMin of ln|A − A∞| is −k.
  return { k: -line.slopePerMin, r2: line.r2, window: { fromS: line.fromS, toS: line.toS } };
}

/**
 * Apparent first-order rate constant of a falling cytochrome c trace, and k per unit of protein
 * concentration in the reaction (mL·min⁻¹·mg⁻¹: the same number as k per mg only in a 1 mL reaction).
 */
export function calculateFirstOrder(
  inputs: FirstOrderInputs,
  definition: AssayDefinition,
): FirstOrderResult {
  const flags: Flag[] = [];
  const choice: WindowChoice = inputs.window ? { kind: 'manual', window: inputs.window } : { kind: 'auto' };
  const total = fitK(inputs.total, 'total', inputs, definition, choice, true, flags);
  let background: { k: number } | null = null;
  if (inputs.background) {
    const bgChoice: WindowChoice = total
      ? { kind: 'manual', window: total.window }
      : choice;
    background = fitK(inputs.background, 'background', inputs, definition, bgChoice, false, flags);
  }
  const bgFailed = inputs.background !== undefined && background === null;
  const k = total && !bgFailed ? total.k - (background?.k ?? 0) : null;
  let kPerMg: number | null = null;
  if (k !== null) {
    if (!(k > 0)) {
      flags.push({
        code: 'WRONG_SIGN',
        message: `first-order rate constant ${fmt(k)} min⁻¹ is not positive: ln|A − A∞| did not fall with time`,
      });
    } else {
      // k grows with the enzyme concentration in the reaction, so divide by mg protein per mL of reaction.
      const proteinInReaction = (inputs.proteinMgPerMl * inputs.sampleVolumeUl) / inputs.reactionVolumeUl;
      kPerMg = k / proteinInReaction;
    }
  }
  return {
    basis: 'first_order_k',
    aInfinity: inputs.aInfinity,
    kPerMin: k,
    kTotalPerMin: total?.k ?? null,
    kBackgroundPerMin: background?.k ?? null,
    r2: total?.r2 ?? null,
    kPerMg,
    unit: FIRST_ORDER_UNIT,
    window: inputs.window ?? total?.window ?? null,
    flags,
  };
}
