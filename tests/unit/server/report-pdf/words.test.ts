import { describe, expect, it } from 'vitest';
import type { ReportResult } from '@/schemas/report-document';
import { STATUS_WORDS, formatInterval } from '../../../../server/domain/report-pdf/words';
import { buildReportDocument } from '../../../factories/report-document';

/*
 * The interval and comparison words of the report, in words as well as colour (WCAG 2.x 1.4.1, use of colour
 * [confirmed]). Demo row: muscle CI activity, one decimal, 14.0–48.0 with mean 28.0 (tests/factories); the
 * expected strings follow from those figures by hand.
 */

const row = (change: Partial<ReportResult>): ReportResult => ({ ...buildReportDocument().specimens[0]!.results[0]!, ...change });

describe('formatInterval', () => {
  it('prints both limits with an en dash and the mean in brackets, at the row decimals', () => {
    expect(formatInterval(row({}))).toBe('14.0\u201348.0 (28.0)');
    expect(formatInterval(row({ referenceMean: null }))).toBe('14.0\u201348.0');
  });

  it('prints a one-sided interval in words, and says when there is none', () => {
    expect(formatInterval(row({ referenceUpper: null }))).toBe('14.0 or more (28.0)');
    expect(formatInterval(row({ referenceLower: null, referenceMean: null }))).toBe('up to 48.0');
    expect(formatInterval(row({ referenceLower: null, referenceUpper: null, referenceMean: null }))).toBe('No interval');
  });
});

describe('STATUS_WORDS', () => {
  it('names every place against the interval in its own words', () => {
    expect(STATUS_WORDS).toEqual({
      below: 'Below interval',
      within: 'Within interval',
      above: 'Above interval',
      not_compared: 'Not compared',
    });
  });
});
