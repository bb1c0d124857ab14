import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  formatDate,
  formatDateOrDateTime,
  formatDateTime,
  formatNumber,
  formatPercent,
} from '../../../../server/domain/report-pdf/format';

describe('formatDate', () => {
  it('when given an ISO date, then it prints day, month name and year without any zone shift', () => {
    expect(formatDate('2025-03-14')).toBe('14 Mar 2025');
    expect(formatDate('2016-09-01')).toBe('1 Sep 2016');
    expect(formatDate('2024-12-31')).toBe('31 Dec 2024');
  });
});

describe('formatDateTime', () => {
  // Offsets from the IANA time-zone database [common practice]: New York is UTC-4 in July (EDT)
  // and UTC-5 in January (EST); Kolkata is UTC+5:30 all year; Amsterdam is UTC+1 in winter.
  it.each([
    ['2025-07-01T12:00:00Z', 'America/New_York', '1 Jul 2025 08:00 (UTC-04:00)'],
    ['2025-01-15T12:00:00Z', 'America/New_York', '15 Jan 2025 07:00 (UTC-05:00)'],
    ['2025-03-14T23:45:00Z', 'Asia/Kolkata', '15 Mar 2025 05:15 (UTC+05:30)'],
    ['2025-03-14T09:30:00+02:00', 'Europe/Amsterdam', '14 Mar 2025 08:30 (UTC+01:00)'],
    ['2025-03-14T09:30:00Z', undefined, '14 Mar 2025 09:30 (UTC+00:00)'],
  ])('when %s is printed for %s, then it reads %s', (iso, zone, expected) => {
    expect(formatDateTime(iso, zone)).toBe(expected);
  });

  it('when a value is a plain date, then it prints as a date; a date-time keeps its time', () => {
    expect(formatDateOrDateTime('2025-03-03')).toBe('3 Mar 2025');
    expect(formatDateOrDateTime('2025-03-03T06:00:00Z', 'UTC')).toBe('3 Mar 2025 06:00 (UTC+00:00)');
  });
});

describe('formatNumber', () => {
  it('when decimals are set, then exactly that many are printed, with a true minus sign', () => {
    expect(formatNumber(9.46, 1)).toBe('9.5');
    expect(formatNumber(0.0664, 3)).toBe('0.066');
    expect(formatNumber(-1.25, 1)).toBe('\u22121.3');
    expect(formatNumber(-0.0001, 2)).toBe('0.00');
  });

  it('when no decimals are set, then the value keeps three significant figures (or all its integer digits)', () => {
    // Definition of rounding to 3 significant figures: |printed - v| <= half a unit in the third
    // significant place [common practice]; integers of 4+ digits are printed whole.
    fc.assert(
      fc.property(fc.double({ min: 0.0005, max: 99_999, noNaN: true }), (v) => {
        const printed = formatNumber(v);
        const magnitude = Math.floor(Math.log10(v));
        const unit = 10 ** Math.min(0, magnitude - 2);
        expect(Math.abs(Number(printed) - v)).toBeLessThanOrEqual(unit / 2 + 1e-9 * v);
        const digits = printed.replace('.', '').replace(/^0+/, '');
        if (magnitude < 3) expect(digits.length).toBe(3);
      }),
      { numRuns: 300 },
    );
  });

  it('when a percentage is printed, then it is a whole number with a % sign', () => {
    expect(formatPercent(33.04)).toBe('33%');
    expect(formatPercent(26.25)).toBe('26%');
    expect(formatPercent(104.07)).toBe('104%');
  });
});
