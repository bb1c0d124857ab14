import type { Measure } from '@/schemas/common';
import type { ReportResult, ResultStatus } from '@/schemas/report-document';
import { formatNumber } from './format';

/*
 * The report's words that other code prints as well (the changed-values list of a correction): kept apart from
 * the drawing code so that using them does not load pdfkit and fontkit.
 */

/** The report's own title, printed on the first page and in the running header. */
export const REPORT_TITLE = 'Respiratory-chain enzyme report';

export const MEASURE_PHRASES: Record<Measure, string> = {
  activity: 'activity',
  ratio_cs: 'ratio to CS',
  ratio_cii: 'ratio to CII',
};

export const STATUS_WORDS: Record<ResultStatus, string> = {
  below: 'Below interval',
  within: 'Within interval',
  above: 'Above interval',
  not_compared: 'Not compared',
};

export const BAND_WORDS = { major: 'major-criterion band', minor: 'minor-criterion band' } as const;

export function formatInterval(r: ReportResult): string {
  const f = (v: number): string => formatNumber(v, r.decimals);
  let range: string;
  if (r.referenceLower !== null && r.referenceUpper !== null) {
    range = `${f(r.referenceLower)}\u2013${f(r.referenceUpper)}`;
  } else if (r.referenceLower !== null) range = `${f(r.referenceLower)} or more`;
  else if (r.referenceUpper !== null) range = `up to ${f(r.referenceUpper)}`;
  else return 'No interval';
  return r.referenceMean !== null ? `${range} (${f(r.referenceMean)})` : range;
}
