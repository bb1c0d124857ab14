import { describe, expect, it } from 'vitest';
import { ageOn } from '../../../../server/domain/report-pdf/age-at-collection';

/*
 * Which strings count as a calendar day. The report passes dates as ISO 8601 calendar dates, YYYY-MM-DD exactly
 * [confirmed: ISO 8601 extended calendar date]; anything else, or a day that does not exist, gives no age rather
 * than a wrong one. Expected answers worked out by hand on a calendar.
 */

describe('ageOn refuses what is not a calendar day', () => {
  it.each([
    ['text', 'not a date'],
    ['a date-time (the caller passes the day in the laboratory zone)', '2025-03-03T10:00:00Z'],
    ['a five-digit year', '12025-03-03'],
    ['a day with something before it', 'x2025-03-03'],
    ['a thirteenth month', '2025-13-01'],
    ['a month 00', '2025-00-10'],
    ['30 February', '2025-02-30'],
    ['31 April', '2025-04-31'],
    ['29 February of a common year', '2025-02-29'],
    ['a year below 100 (JavaScript would read 0050 as 1950)', '0050-01-01'],
  ])('when the collection day is %s, then there is no age', (_, day) => {
    expect(ageOn('2016-08-09', day)).toBeNull();
  });

  it('accepts 29 February of a leap year and the last day of each month', () => {
    expect(ageOn('2016-08-09', '2024-02-29')).toEqual({ years: 7, months: 6, days: 20 }); // 9 Feb → 29 Feb = 20 days
    expect(ageOn('2016-08-09', '2024-04-30')).toEqual({ years: 7, months: 8, days: 21 }); // 9 Apr → 30 Apr
  });

  it('counts months across a year end from a birth late in the year (born 20 Nov, 5 Jan: 1 month 16 days)', () => {
    expect(ageOn('2024-11-20', '2025-01-05')).toEqual({ years: 0, months: 1, days: 16 }); // 20 Dec → 5 Jan = 16 days
    expect(ageOn('2024-11-20', '2025-02-19')).toEqual({ years: 0, months: 2, days: 30 }); // 20 Jan → 19 Feb = 30 days
  });
});
