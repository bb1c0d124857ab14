import {
  ACTIVITY_UNIT,
  type AssayDefinition,
  type CalculationRequest,
  type CalculationResult,
  type FirstOrderResult,
  type Flag,
  type FittedLine,
  type RateWindow,
  type TracePoint,
} from '@/schemas/assay';
import { activityFactor } from './activity';
import { calculateFirstOrder } from './first-order';
import { fitTrace, flagJumpAgainst, type WindowChoice } from './rates';
import { fmt, sameTrace } from './trace';

/** Inputs beyond the HTTP contract, for callers that have them (plate wells, first-order runs). */
export interface CalculationOptions {
  /** A no-sample trace, or its slope in absorbance units per minute, subtracted from each trace. */
  blank?: readonly TracePoint[] | { slopePerMin: number };
  /** Fully oxidised absorbance; with a first-order definition, adds the k result. */
  aInfinity?: number;
}

/** Slopes closer than this (relative) are taken as the same: the background cancels the total. */
const SAME_SLOPE_RELATIVE = 1e-9;

/**
 * One assay from one pair of traces: slopes, specific slope, specific activity (linear model) and the
 * flags that explain every missing or doubtful number. Pure; never throws on bad readings, only on a
 * definition that does not belong to the request.
 */
export function calculateActivity(
  request: CalculationRequest,
  definition: AssayDefinition,
  options: CalculationOptions = {},
): CalculationResult {
  if (request.assay !== definition.code) {
    throw new RangeError(
      `assay: the request is for ${request.assay} but the definition given is for ${definition.code}`,
    );
  }
  const flags: Flag[] = [];
  const manual = request.window !== undefined;
  const totalChoice: WindowChoice = request.window
    ? { kind: 'manual', window: request.window }
    : { kind: 'auto' };

  const fitTotal = fitTrace(request.total, 'total', definition, totalChoice, { checkR2: true }, flags);
  const pairedChoice = pairedWindow(request.window, fitTotal);

  let fitBackground: FittedLine | null = null;
  if (request.background) {
    // A baseline before the starting substrate is its own stretch of time: with an automatic window
    // it is fitted whole. A manual window applies to both traces, as the contract says.
    const bgChoice: WindowChoice =
      !manual && definition.background === 'baseline' ? { kind: 'all' } : pairedChoice;
    fitBackground = fitTrace(request.background, 'background', definition, bgChoice, { checkR2: false }, flags);
  } else if (definition.background !== 'none') {
    flags.push(noBackgroundFlag(definition));
  }

  let slopeBlankPerMin: number | null = null;
  let fitBlankLine: FittedLine | null = null;
  let blankFailed = false;
  if (options.blank) {
    if (isSlope(options.blank)) {
      if (Number.isFinite(options.blank.slopePerMin)) slopeBlankPerMin = options.blank.slopePerMin;
      else {
        flags.push({ code: 'NON_FINITE', message: 'blank slope is not a finite number' });
        blankFailed = true;
      }
    } else {
      const fitBlank = fitTrace(options.blank, 'blank', definition, pairedChoice, { checkR2: false }, flags);
      fitBlankLine = fitBlank;
      if (fitBlank) slopeBlankPerMin = fitBlank.slopePerMin;
      else blankFailed = true;
    }
  }

  const slopeTotalPerMin = fitTotal?.slopePerMin ?? null;
  const slopeBackgroundPerMin = fitBackground?.slopePerMin ?? null;
  const backgroundFailed = request.background !== undefined && fitBackground === null;

  // The blank is in both the total and the background, so it cancels when a background is given:
  // (T − blank) − (B − blank) = T − B. Without a background it is subtracted from the total.
  let specificSlopePerMin: number | null = null;
  if (slopeTotalPerMin !== null && !backgroundFailed && !blankFailed) {
    specificSlopePerMin =
      slopeBackgroundPerMin !== null
        ? slopeTotalPerMin - slopeBackgroundPerMin
        : slopeTotalPerMin - (slopeBlankPerMin ?? 0);
  }

  // A jump in level in the background or blank trace moves the specific rate as much as one in the total does.
  if (specificSlopePerMin !== null) {
    if (request.background && fitBackground) flagJumpAgainst(request.background, fitBackground, 'background', specificSlopePerMin, definition, flags);
    // With a background the blank is in both traces and cancels, so only a blank subtracted on its own is judged.
    if (!request.background && fitBlankLine && options.blank && !isSlope(options.blank)) {
      flagJumpAgainst(options.blank, fitBlankLine, 'blank', specificSlopePerMin, definition, flags);
    }
  }

  const inputs = inputsOf(request, definition);
  const factor = checkedFactor(request, definition, flags);

  let activity: number | null = null;
  if (specificSlopePerMin !== null && Number.isFinite(factor) && factor > 0) {
    const ok = judgeSpecificSlope(
      specificSlopePerMin,
      slopeTotalPerMin!,
      request.background ? { identicalTraces: sameTrace(request.total, request.background) } : null,
      definition,
      flags,
    );
    judgeFractions(slopeTotalPerMin!, slopeBackgroundPerMin, slopeBlankPerMin, definition, flags);
    activity = ok ? plausibleActivity(Math.abs(specificSlopePerMin) * factor, definition, flags) : null;
  }

  if (options.aInfinity !== undefined && definition.rateModel !== 'first_order') {
    flags.push({
      code: 'A_INFINITY_UNUSED',
      message: `An end-point absorbance A∞ = ${fmt(options.aInfinity)} was given, but the ${definition.code} definition in force (version ${definition.version}) uses the linear rate model: A∞ was not used`,
    });
  }

  let firstOrder: FirstOrderResult | null = null;
  if (definition.rateModel === 'first_order') {
    if (options.aInfinity === undefined) {
      flags.push({
        code: 'FIRST_ORDER_NOT_COMPUTED',
        message: `The ${definition.code} definition reports a first-order rate constant, which needs the end-point absorbance A∞; only the linear early rate is given`,
      });
    } else {
      firstOrder = calculateFirstOrder(
        {
          total: request.total,
          background: request.background,
          aInfinity: options.aInfinity,
          window: request.window,
          reactionVolumeUl: request.reactionVolumeUl,
          sampleVolumeUl: request.sampleVolumeUl,
          proteinMgPerMl: request.proteinMgPerMl,
        },
        definition,
      );
    }
  }

  return {
    assay: request.assay,
    definitionVersion: definition.version,
    slopeTotalPerMin,
    slopeBackgroundPerMin,
    specificSlopePerMin,
    activity,
    unit: ACTIVITY_UNIT,
    r2: fitTotal?.r2 ?? null,
    window: request.window
      ? { fromS: request.window.fromS, toS: request.window.toS }
      : fitTotal
        ? { fromS: fitTotal.fromS, toS: fitTotal.toS }
        : traceSpan(request.total),
    flags,
    basis: 'linear_rate',
    windowAuto: !manual,
    slopeBlankPerMin,
    residualSd: fitTotal?.residualSd ?? null,
    fitTotal,
    fitBackground,
    factor,
    inputs,
    firstOrder,
  };
}

type Conditions = Pick<
  CalculationRequest,
  'pathlengthCm' | 'reactionVolumeUl' | 'sampleVolumeUl' | 'proteinMgPerMl'
>;

function inputsOf(request: Conditions, definition: AssayDefinition): CalculationResult['inputs'] {
  return {
    epsilonPerMmPerCm: definition.epsilonPerMmPerCm,
    epsilonSource: definition.epsilonSource,
    pathlengthCm: request.pathlengthCm,
    reactionVolumeUl: request.reactionVolumeUl,
    sampleVolumeUl: request.sampleVolumeUl,
    proteinMgPerMl: request.proteinMgPerMl,
    direction: definition.direction,
    backgroundKind: definition.background,
    rateModel: definition.rateModel,
  };
}

function noBackgroundFlag(definition: AssayDefinition): Flag {
  return {
    code: 'NO_BACKGROUND',
    message: `The ${definition.code} definition subtracts a background trace (${definition.backgroundNote || definition.background}), but none was sent: the total slope is used as the specific slope`,
  };
}

/** The activity factor, with a flag when it is not a finite positive number. */
function checkedFactor(request: Conditions, definition: AssayDefinition, flags: Flag[]): number {
  const factor = activityFactor({
    epsilonPerMmPerCm: definition.epsilonPerMmPerCm,
    pathlengthCm: request.pathlengthCm,
    reactionVolume: request.reactionVolumeUl,
    sampleVolume: request.sampleVolumeUl,
    proteinMgPerMl: request.proteinMgPerMl,
  });
  if (!Number.isFinite(factor) || !(factor > 0)) {
    flags.push({
      code: 'NON_FINITE',
      message: `The activity factor is not a finite positive number (ε ${fmt(definition.epsilonPerMmPerCm)}, pathlength ${fmt(request.pathlengthCm)} cm, volumes ${fmt(request.reactionVolumeUl)}/${fmt(request.sampleVolumeUl)} µL, protein ${fmt(request.proteinMgPerMl)} mg/mL)`,
    });
  }
  return factor;
}

function isSlope(b: NonNullable<CalculationOptions['blank']>): b is { slopePerMin: number } {
  return !Array.isArray(b);
}

/** The window the background and blank share with the total: the manual one, or the total's fitted span. */
function pairedWindow(window: RateWindow | undefined, fitTotal: FittedLine | null): WindowChoice {
  if (window) return { kind: 'manual', window };
  if (fitTotal) return { kind: 'manual', window: { fromS: fitTotal.fromS, toS: fitTotal.toS } };
  return { kind: 'auto' };
}

function traceSpan(trace: readonly TracePoint[]): { fromS: number; toS: number } | null {
  const first = trace[0];
  const last = trace[trace.length - 1];
  if (!first || !last || !Number.isFinite(first.t) || !Number.isFinite(last.t)) return null;
  return { fromS: first.t, toS: last.t };
}

/**
 * Sign and size checks on the specific slope. Returns false when no activity may be given (wrong
 * direction); near-zero and cancelled slopes still give a number, with a flag.
 */
function judgeSpecificSlope(
  specific: number,
  total: number,
  background: { identicalTraces: boolean } | null,
  definition: AssayDefinition,
  flags: Flag[],
): boolean {
  const expectedSign = definition.direction === 'rises' ? 1 : -1;
  if (
    background &&
    (background.identicalTraces || Math.abs(specific) <= SAME_SLOPE_RELATIVE * Math.abs(total))
  ) {
    flags.push({
      code: 'BACKGROUND_MATCHES_TOTAL',
      message: background.identicalTraces
        ? 'The background trace is identical to the total trace: check that the right readings were sent for each'
        : 'The background slope equals the total slope: no inhibitor-sensitive rate remains',
    });
  }
  let ok = true;
  if (specific * expectedSign < 0) {
    flags.push({
      code: 'WRONG_SIGN',
      message: `Specific slope ${fmt(specific)} /min ${specific > 0 ? 'rises' : 'falls'}, but absorbance ${definition.direction} in the ${definition.code} assay: no activity is given`,
    });
    ok = false;
  }
  if (Math.abs(specific) < definition.nearZeroSlopePerMin) {
    flags.push({
      code: 'NEAR_ZERO',
      message: `Specific slope ${fmt(specific)} /min is within ±${fmt(definition.nearZeroSlopePerMin)} /min of zero, the laboratory's limit of a measurable rate`,
    });
  }
  return ok;
}

/** A rate's share of the total, %, when both run the same way; null otherwise. */
function shareOfTotal(part: number | null, total: number): number | null {
  if (part === null || total === 0 || Math.sign(part) !== Math.sign(total)) return null;
  return (100 * part) / total;
}

/**
 * The inhibitor-insensitive (or pre-substrate) rate and the no-sample blank as shares of the total rate. When
 * most of the total remains with the inhibitor, the activity is a small difference of two large slopes and
 * every error in either is multiplied [common practice; limits set per definition].
 */
function judgeFractions(
  total: number,
  background: number | null,
  blank: number | null,
  definition: AssayDefinition,
  flags: Flag[],
): void {
  const bgPct = shareOfTotal(background, total);
  if (bgPct !== null && bgPct > definition.maxBackgroundPct && definition.background !== 'none') {
    const what =
      definition.background === 'inhibitor'
        ? `with ${definition.backgroundNote || 'the inhibitor'} (inhibitor-insensitive)`
        : `of the baseline (${definition.backgroundNote || 'before the substrate'})`;
    flags.push({
      code: 'HIGH_BACKGROUND_FRACTION',
      message: `The rate ${what} is ${fmt(bgPct, 3)}% of the total rate (limit ${fmt(definition.maxBackgroundPct, 3)}%): only ${fmt(100 - bgPct, 3)}% is the ${definition.code} activity, so small errors in either slope move it a lot`,
      values: { backgroundPct: bgPct, limitPct: definition.maxBackgroundPct },
    });
  }
  const blankPct = shareOfTotal(blank, total);
  if (blankPct !== null && blankPct > definition.maxBlankPct) {
    flags.push({
      code: 'HIGH_BLANK_FRACTION',
      message: `The no-sample blank's rate is ${fmt(blankPct, 3)}% of the total rate (limit ${fmt(definition.maxBlankPct, 3)}%): most of the change happens without the sample`,
      values: { blankPct, limitPct: definition.maxBlankPct },
    });
  }
}

/** The activity, or null with a flag when it is above the definition's plausible ceiling. */
function plausibleActivity(activity: number, definition: AssayDefinition, flags: Flag[]): number | null {
  if (activity <= definition.plausibleActivityMax) return activity;
  flags.push({
    code: 'IMPLAUSIBLE_ACTIVITY',
    message: `The computed activity, ${fmt(activity, 4)} nmol/min/mg protein, is above the plausible ceiling of ${fmt(definition.plausibleActivityMax, 4)} for ${definition.code}: no activity is given. Check the units of the rates (A/min, not mA/min), the volumes (µL) and the protein (mg/mL)`,
    values: { computed: activity, ceiling: definition.plausibleActivityMax },
  });
  return null;
}

/** Rates read off the instrument and typed in: ΔA/min of the total and, when measured, the background. */
export interface RatesRequest extends Conditions {
  assay: CalculationRequest['assay'];
  /** Signed, absorbance units per minute. */
  totalRatePerMin: number;
  /** Signed; null when no background rate was measured. */
  backgroundRatePerMin: number | null;
}

/**
 * One assay from typed rates instead of traces: the same subtraction, factor and sign / near-zero /
 * cancelled-background checks as calculateActivity, with no fit (r², window and fitted lines are null).
 */
export function calculateActivityFromRates(
  request: RatesRequest,
  definition: AssayDefinition,
): CalculationResult {
  if (request.assay !== definition.code) {
    throw new RangeError(
      `assay: the request is for ${request.assay} but the definition given is for ${definition.code}`,
    );
  }
  const flags: Flag[] = [];
  const total = request.totalRatePerMin;
  const background = request.backgroundRatePerMin;
  let ratesOk = true;
  if (!Number.isFinite(total)) {
    flags.push({ code: 'NON_FINITE', message: `total rate is not a finite number (${String(total)})` });
    ratesOk = false;
  }
  if (background !== null && !Number.isFinite(background)) {
    flags.push({ code: 'NON_FINITE', message: `background rate is not a finite number (${String(background)})` });
    ratesOk = false;
  }
  if (background === null && definition.background !== 'none') flags.push(noBackgroundFlag(definition));

  const specificSlopePerMin = ratesOk ? total - (background ?? 0) : null;
  const factor = checkedFactor(request, definition, flags);
  let activity: number | null = null;
  if (specificSlopePerMin !== null && Number.isFinite(factor) && factor > 0) {
    const ok = judgeSpecificSlope(
      specificSlopePerMin,
      total,
      background === null ? null : { identicalTraces: false },
      definition,
      flags,
    );
    judgeFractions(total, background, null, definition, flags);
    activity = ok ? plausibleActivity(Math.abs(specificSlopePerMin) * factor, definition, flags) : null;
  }
  if (definition.rateModel === 'first_order') {
    flags.push({
      code: 'FIRST_ORDER_NOT_COMPUTED',
      message: `The ${definition.code} definition reports a first-order rate constant, which needs the readings themselves; typed rates give only the linear early rate`,
    });
  }
  return {
    assay: request.assay,
    definitionVersion: definition.version,
    slopeTotalPerMin: ratesOk ? total : null,
    slopeBackgroundPerMin: ratesOk ? background : null,
    specificSlopePerMin,
    activity,
    unit: ACTIVITY_UNIT,
    r2: null,
    window: null,
    flags,
    basis: 'linear_rate',
    windowAuto: false,
    slopeBlankPerMin: null,
    residualSd: null,
    fitTotal: null,
    fitBackground: null,
    factor,
    inputs: inputsOf(request, definition),
    firstOrder: null,
  };
}
