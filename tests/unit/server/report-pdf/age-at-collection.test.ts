import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ageAtCollectionText, ageOn, formatAge } from '../../../../server/domain/report-pdf/age-at-collection';
import { ageInYears } from '../../../../server/modules/results/results.service';

/*
 * Age on the collection day. Every expected value below was worked out by hand on a calendar, not taken from
 * the code. Conventions:
 * - age in completed years, the birthday counting as completed [common practice, civil age];
 * - a 29 February birthday is reached on 1 March in a common year [from memory: the rule of several civil
 *   codes; others use 28 February, so the choice is stated on the function];
 * - under 2 years the months are printed too, under 1 month the days [common practice in paediatric reports].
 */

const text = (birth: string, on: string) => formatAge(ageOn(birth, on)!);

describe('age at collection, hand-worked examples', () => {
  it('whole years: the day before the birthday and the birthday itself', () => {
    expect(ageOn('2015-06-15', '2024-06-14')).toEqual({ years: 8, months: 11, days: 30 }); // 15 May → 14 Jun = 30 days
    expect(text('2015-06-15', '2024-06-14')).toBe('8 years');
    expect(text('2015-06-15', '2024-06-15')).toBe('9 years');
    expect(text('1990-12-31', '2025-01-01')).toBe('34 years');
  });

  it('born on 29 February: one on 1 March of a common year, not on 28 February', () => {
    expect(ageOn('2020-02-29', '2021-02-28')).toEqual({ years: 0, months: 11, days: 30 }); // 29 Jan → 28 Feb
    expect(text('2020-02-29', '2021-02-28')).toBe('11 months');
    expect(ageOn('2020-02-29', '2021-03-01')).toEqual({ years: 1, months: 0, days: 0 });
    expect(text('2020-02-29', '2021-03-01')).toBe('1 year 0 months');
    // Third birthday reached on 1 March 2023; on 28 February 2023 still two.
    expect(ageOn('2020-02-29', '2023-02-28')).toEqual({ years: 2, months: 11, days: 30 });
    expect(text('2020-02-29', '2023-02-28')).toBe('2 years');
    expect(text('2020-02-29', '2024-02-29')).toBe('4 years');
    expect(text('2020-02-29', '2024-02-28')).toBe('3 years');
  });

  it('infants: months, and days under one month (end-of-month births)', () => {
    // Born 31 Jan 2024; 29 Feb 2024 has no 31st → one month is reached on 1 Mar.
    expect(ageOn('2024-01-31', '2024-02-29')).toEqual({ years: 0, months: 0, days: 29 });
    expect(text('2024-01-31', '2024-02-29')).toBe('29 days');
    expect(text('2024-01-31', '2024-03-01')).toBe('1 month');
    expect(text('2024-01-31', '2025-01-30')).toBe('11 months'); // 31 Dec → 30 Jan: 30 days over 11 months
    expect(text('2024-01-31', '2025-01-31')).toBe('1 year 0 months');
    expect(ageOn('2024-01-31', '2025-05-10')).toEqual({ years: 1, months: 3, days: 9 }); // 15 months on 1 May
    expect(text('2024-01-31', '2025-05-10')).toBe('1 year 3 months');
    expect(text('2022-11-20', '2024-11-19')).toBe('1 year 11 months');
    expect(text('2022-11-20', '2024-11-20')).toBe('2 years');
    expect(text('2025-03-14', '2025-03-14')).toBe('0 days');
    expect(text('2025-03-14', '2025-03-15')).toBe('1 day');
    expect(text('2024-12-15', '2025-01-15')).toBe('1 month');
  });

  it('says why when the age cannot be given', () => {
    expect(ageOn('2020-05-01', '2020-04-30')).toBeNull();
    expect(ageOn('2023-02-30', '2024-01-01')).toBeNull();
    expect(ageAtCollectionText('2020-05-01', null)).toBe('Not known (collection date not recorded)');
    expect(ageAtCollectionText('2020-05-01', '2020-04-30')).toBe('Not known (collected before the recorded date of birth)');
    expect(ageAtCollectionText('2015-06-15', '2024-06-15')).toBe('9 years');
  });

  it('whole years agree with the age used to choose reference intervals [derived: same birthday rule]', () => {
    const day = fc.date({ min: new Date('1950-01-01T00:00:00Z'), max: new Date('2040-12-31T00:00:00Z'), noInvalidDate: true });
    fc.assert(
      fc.property(day, day, (a, b) => {
        const [birth, on] = a <= b ? [a, b] : [b, a];
        const iso = (d: Date) => d.toISOString().slice(0, 10);
        const printed = ageOn(iso(birth), iso(on))!;
        const forIntervals = ageInYears(iso(birth), new Date(`${iso(on)}T00:00:00Z`))!;
        expect(printed.years).toBe(Math.floor(forIntervals));
      }),
      { numRuns: 2000 },
    );
  });
});
