import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  birthDateSchema,
  dateTimeSchema,
  findUnsafeCharacter,
  isCalendarDate,
  isIanaTimeZone,
  latestToday,
} from '@/schemas/common';
import { readPastedNumbers } from '@/schemas/pasted-numbers';

/*
 * The shared input rules checked against references outside the code: the Gregorian leap-year rule
 * [confirmed: ISO 8601 / the Gregorian calendar], the JavaScript engine's own Unicode character database through
 * regular-expression property escapes (\p{Cc}, \p{Bidi_Control}, \p{Zl}, \p{Zp}) [confirmed: ECMAScript, UAX #44],
 * and the engine's IANA zone list, Intl.supportedValuesOf('timeZone') [confirmed: ECMA-402].
 */

const pad = (n: number, w = 2) => String(n).padStart(w, '0');

describe('isCalendarDate', () => {
  it('follows the Gregorian leap-year rule: 2000 and 2024 have 29 February, 1900, 2100 and 2019 do not [confirmed]', () => {
    expect(['2000-02-29', '2024-02-29', '1600-02-29'].map(isCalendarDate)).toEqual([true, true, true]);
    expect(['1900-02-29', '2100-02-29', '2019-02-29'].map(isCalendarDate)).toEqual([false, false, false]);
  });

  it('knows the months of 30 and 31 days [confirmed] and refuses month 0, month 13 and day 0', () => {
    expect(['2025-04-30', '2025-04-31', '2025-12-31', '2025-11-31'].map(isCalendarDate)).toEqual([true, false, true, false]);
    expect(['2020-02-30', '0000-00-00', '2019-13-01', '2019-00-10', '2019-05-00'].map(isCalendarDate)).toEqual([
      false, false, false, false, false,
    ]);
  });

  it('agrees with a round trip through the engine\'s proleptic Gregorian Date for any year, month 0–13 and day 0–32 (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 9999 }), fc.integer({ min: 0, max: 13 }), fc.integer({ min: 0, max: 32 }), (y, m, d) => {
        const date = new Date(0);
        date.setUTCFullYear(y, m - 1, d);
        const roundTrip = m >= 1 && m <= 12 && d >= 1 && date.getUTCFullYear() === y && date.getUTCMonth() === m - 1 && date.getUTCDate() === d;
        expect(isCalendarDate(`${pad(y, 4)}-${pad(m)}-${pad(d)}`)).toBe(roundTrip);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('birthDateSchema', () => {
  it('accepts 1900-01-01 and today, refuses 1899-12-31 and the day after tomorrow [our stated limits]', () => {
    expect(birthDateSchema.safeParse('1900-01-01').success).toBe(true);
    expect(birthDateSchema.safeParse(new Date().toISOString().slice(0, 10)).success).toBe(true);
    expect(birthDateSchema.safeParse('1899-12-31').success).toBe(false);
    const dayAfterTomorrow = new Date(Date.now() + 2 * 86_400_000).toISOString().slice(0, 10);
    expect(dayAfterTomorrow > latestToday()).toBe(true);
    expect(birthDateSchema.safeParse(dayAfterTomorrow).success).toBe(false);
  });
});

describe('dateTimeSchema', () => {
  const schema = dateTimeSchema('Receipt date and time');
  it('accepts datetime-local values and ISO strings with Z or an offset', () => {
    for (const v of ['2026-03-04T09:30', '2024-02-29T23:59:59', '2026-03-04T09:30:00.000Z', '2026-03-04T09:30:00+13:00']) {
      expect(schema.safeParse(v).success, v).toBe(true);
    }
  });
  it('refuses days and times that do not exist, which Date.parse would roll over', () => {
    // V8's Date.parse reads "2026-02-30T10:00" as 2 March [observed], so the rule cannot rest on it.
    for (const v of ['2026-02-30T10:00', '2026-02-30T10:00:00Z', '2025-13-01T10:00', '2025-06-01T24:00', '2025-06-01T10:60', '0000-01-01T00:00', 'yesterday']) {
      const r = schema.safeParse(v);
      expect(r.success, v).toBe(false);
      expect(r.error?.issues[0]?.message).toMatch(/^Receipt date and time/);
    }
  });
});

describe('findUnsafeCharacter', () => {
  const controlOrBidi = /[\p{Cc}\p{Bidi_Control}\p{Zl}\p{Zp}]/u;

  it('in a single line refuses exactly the Unicode controls (Cc), bidi controls and line/paragraph separators of the BMP', () => {
    const wrong: string[] = [];
    for (let cp = 0; cp <= 0xffff; cp++) {
      if (cp >= 0xd800 && cp <= 0xdfff) continue;
      const ch = String.fromCodePoint(cp);
      if ((findUnsafeCharacter(`a${ch}b`) !== null) !== controlOrBidi.test(ch)) wrong.push(cp.toString(16));
    }
    expect(wrong).toEqual([]);
  });

  it('in free text also keeps tab, line feed, carriage return and the direction marks, and refuses the rest', () => {
    const kept = new Set([0x09, 0x0a, 0x0d, 0x061c, 0x200e, 0x200f]);
    const wrong: string[] = [];
    for (let cp = 0; cp <= 0xffff; cp++) {
      if (cp >= 0xd800 && cp <= 0xdfff) continue;
      const ch = String.fromCodePoint(cp);
      const expected = controlOrBidi.test(ch) && !kept.has(cp);
      if ((findUnsafeCharacter(`a${ch}b`, true) !== null) !== expected) wrong.push(cp.toString(16));
    }
    expect(wrong).toEqual([]);
  });

  it('names the character and its position', () => {
    expect(findUnsafeCharacter('Martin\u202Egpj')).toBe('U+202E at position 7');
    expect(findUnsafeCharacter('Zoë Nguyễn عائشة')).toBeNull();
  });
});

describe('isIanaTimeZone', () => {
  it('accepts every zone the engine lists, and UTC and common aliases', () => {
    const zones = Intl.supportedValuesOf('timeZone');
    expect(zones.length).toBeGreaterThan(300);
    expect(zones.filter((z) => !isIanaTimeZone(z))).toEqual([]);
    for (const alias of ['UTC', 'Etc/UTC', 'GMT', 'Etc/GMT+5', 'US/Eastern', 'Asia/Calcutta']) expect(isIanaTimeZone(alias), alias).toBe(true);
  });
  it('refuses typos, invented zones and bare offsets', () => {
    for (const bad of ['Europe/Londn', 'Mars/Olympus_Mons', '+01:00', '-0500', '', ' ']) expect(isIanaTimeZone(bad), bad).toBe(false);
  });
});

describe('readPastedNumbers', () => {
  it('reads a column, a row with spaces, tabs, semicolons, and comma lists of point decimals', () => {
    expect(readPastedNumbers('37.5\n41.2\r\n39').values).toEqual([37.5, 41.2, 39]);
    expect(readPastedNumbers('37.5 41.2\t39;40').values).toEqual([37.5, 41.2, 39, 40]);
    expect(readPastedNumbers('37.5,41.2, 39.0').values).toEqual([37.5, 41.2, 39]);
  });
  it('refuses a decimal comma, naming the line and the point form, instead of reading two values', () => {
    const r = readPastedNumbers('37.5\n41,2\n39');
    expect(r.problem).toBe('Line 2: "41,2" looks like a decimal comma; use a point (41.2)');
  });
  it('refuses thousands separators and lists at most three problems', () => {
    expect(readPastedNumbers('1,250,000').problem).toMatch(/^Line 1: "1,250,000" has commas between digits/);
    const r = readPastedNumbers('a\nb\nc\nd\ne');
    expect(r.problem).toBe('Line 1: "a" is not a number; line 2: "b" is not a number; line 3: "c" is not a number; and 2 more');
  });
});
