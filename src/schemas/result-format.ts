import { criteriaRuleFor, defaultDiagnosticCriteria, type DiagnosticCriteria } from './assay';
import type { SpecimenType } from './common';

/*
 * How result numbers are printed, on the screen and on the report alike. It lives beside the schemas
 * because the server may import only from src/schemas and the client must print the same figures.
 *
 * The rule: a printed number never sits on the other side of a threshold than the value it stands for.
 * Bands and interval positions are decided on unrounded values; when the usual rounding would carry a
 * value across a threshold that decided its band or position (19.96% printed "20%" beside "major
 * band", < 20%), one more decimal is printed, and more until the printed number lies on the same side.
 */

/**
 * Thresholds a printed number must not cross. A `below` threshold t classifies by value < t (criterion
 * bands, the lower reference limit); an `above` threshold by value > t (the upper reference limit).
 */
export interface Thresholds {
  below?: readonly number[];
  above?: readonly number[];
}

const MINUS = '\u2212';
const MAX_PLACES = 6;

function sides(x: number, t: Thresholds): boolean[] {
  return [...(t.below ?? []).map((c) => x < c), ...(t.above ?? []).map((c) => x > c)];
}

function sameSides(a: number, b: number, t: Thresholds): boolean {
  const sa = sides(a, t);
  const sb = sides(b, t);
  return sa.every((s, i) => s === sb[i]);
}

function signed(text: string): string {
  if (Number(text) === 0) return text.replace('-', '');
  return text.startsWith('-') ? MINUS + text.slice(1) : text;
}

/**
 * `value` with `places` decimals, or more when fewer would carry it across one of `thresholds`. Past six
 * decimals the last digit is rounded towards the value's own side (19.9999999 → "19.999999").
 */
export function formatWithin(value: number, places: number, thresholds: Thresholds = {}): string {
  const last = Math.max(places, MAX_PLACES);
  for (let p = places; p <= last; p++) {
    const text = value.toFixed(p);
    if (sameSides(value, Number(text), thresholds)) return signed(text);
  }
  const scale = 10 ** last;
  const down = Math.floor(value * scale) / scale;
  const text = sameSides(value, down, thresholds) ? down.toFixed(last) : (Math.ceil(value * scale) / scale).toFixed(last);
  return signed(text);
}

/**
 * A result, a reference limit or a ratio: fixed decimals when the assay definition sets them; otherwise
 * three significant figures and never fewer than zero decimals (1234 → "1234", 56.78 → "56.8",
 * 0.01234 → "0.0123"); more when needed not to cross `thresholds`. Negative numbers use a true minus sign.
 */
export function formatResultNumber(value: number, decimals?: number, thresholds: Thresholds = {}): string {
  let places = decimals;
  if (places === undefined) {
    // Magnitude after rounding, so 9.996 prints as "10.0", not "10.00".
    const rounded = Math.abs(Number(value.toPrecision(3)));
    const magnitude = rounded === 0 ? 0 : Math.floor(Math.log10(rounded));
    places = Math.min(MAX_PLACES, Math.max(0, 2 - magnitude));
  }
  return formatWithin(value, places, thresholds);
}

/**
 * % of the reference mean as a reader takes it in: whole numbers from 10% up, one decimal below; more
 * decimals only when needed not to cross a criterion threshold ("19.9%" in the major band, not "20%").
 */
export function formatPercentOfMean(pct: number, thresholds: Thresholds = {}): string {
  const places = Math.abs(Math.round(pct * 10) / 10) >= 10 ? 0 : 1;
  return `${formatWithin(pct, places, thresholds)}%`;
}

/** The criterion-band thresholds (% of the reference mean) for a specimen type under a rule set. */
export function bandThresholds(
  specimenType: SpecimenType,
  criteria: DiagnosticCriteria = defaultDiagnosticCriteria,
): Thresholds {
  const rule = criteriaRuleFor(specimenType, criteria);
  return { below: [rule.majorBelowPct, rule.minorBelowPct] };
}

/** A value against its reference interval: below when under the lower limit, above when over the upper. */
export function intervalThresholds(interval: { lower: number | null; upper: number | null } | null): Thresholds {
  if (!interval) return {};
  return {
    below: interval.lower === null ? [] : [interval.lower],
    above: interval.upper === null ? [] : [interval.upper],
  };
}
