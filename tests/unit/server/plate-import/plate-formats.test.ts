import { describe, expect, it } from 'vitest';
import { describeWellRange, normaliseWellId, normaliseWellIdFor, plateWellIds, wellIdsOf } from '@/schemas/plate';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';

/*
 * Plate footprints after ANSI/SLAS 4-2004 (well positions) [from memory]: 24 wells = 4 rows A–D × 6 columns,
 * 96 = 8 rows A–H × 12 columns, 384 = 16 rows A–P × 24 columns; A1 top left, wells read row by row.
 */
describe('well ids of 24-, 96- and 384-well plates', () => {
  it('lists rows × columns wells, first A1 and last D6 / H12 / P24 [from memory: ANSI/SLAS 4-2004]', () => {
    expect(wellIdsOf(24)).toHaveLength(4 * 6);
    expect(wellIdsOf(96)).toHaveLength(8 * 12);
    expect(wellIdsOf(384)).toHaveLength(16 * 24);
    expect([wellIdsOf(24)[0], wellIdsOf(24).at(-1)]).toEqual(['A1', 'D6']);
    expect([wellIdsOf(384)[0], wellIdsOf(384).at(-1)]).toEqual(['A1', 'P24']);
    // Row by row: the 7th well of a 24-well plate starts row B [from memory: A1…A6 then B1].
    expect(wellIdsOf(24)[6]).toBe('B1');
    expect(wellIdsOf(384)[24]).toBe('B1');
  });

  it('keeps the 96-well list and reader unchanged', () => {
    expect(wellIdsOf(96)).toEqual(plateWellIds);
    for (const raw of ['b3', 'B03', ' H12 ']) expect(normaliseWellId(raw)).toBe(normaliseWellIdFor(raw, 96));
    expect(normaliseWellId('I1')).toBeNull();
  });

  it('accepts each format its own wells only', () => {
    expect(normaliseWellIdFor('d6', 24)).toBe('D6');
    expect(normaliseWellIdFor('E1', 24)).toBeNull(); // row E is off a 4-row plate
    expect(normaliseWellIdFor('A7', 24)).toBeNull(); // column 7 is off a 6-column plate
    expect(normaliseWellIdFor('p024', 384)).toBe('P24');
    expect(normaliseWellIdFor('Q1', 384)).toBeNull();
    expect(normaliseWellIdFor('A25', 384)).toBeNull();
    expect(normaliseWellIdFor('A0', 384)).toBeNull();
    expect(new Set(wellIdsOf(384)).size).toBe(384);
  });

  it('names the range in messages', () => {
    expect(describeWellRange(96)).toBe('A1 to H12 (row letter A–H, column 1–12)');
    expect(describeWellRange(384)).toBe('A1 to P24 (row letter A–P, column 1–24)');
  });
});

describe('plate files of other formats', () => {
  const fileOf = (wells: string[]) =>
    `time_s,${wells.join(',')}\n0,${wells.map(() => '0.5').join(',')}\n30,${wells.map(() => '0.6').join(',')}\n`;

  it('reads every column of a whole 384-well file', () => {
    const parsed = parsePlateFile(fileOf(wellIdsOf(384)), 384);
    expect(parsed.wells).toHaveLength(384);
    expect(parsed.wells.at(-1)).toMatchObject({ well: 'P24', columnNumber: 385, absorbances: [0.5, 0.6] });
  });

  it('refuses P24 in a 96-well file with the existing message, and E1 in a 24-well file naming the column', () => {
    const err96 = (() => {
      try {
        parsePlateFile(fileOf(['A1', 'P24']));
      } catch (e) {
        return e as PlateImportError;
      }
      throw new Error('accepted');
    })();
    expect(err96.issues[0]).toMatchObject({ code: 'BAD_WELL_NAME', row: 1, column: 'P24', columnNumber: 3 });
    expect(err96.issues[0]!.message).toBe(
      '"P24" is not a well of a 96-well plate; well columns are named A1 to H12 (row letter A–H, column 1–12).',
    );
    expect(() => parsePlateFile(fileOf(['A1', 'E1']), 24)).toThrow(/"E1" is not a well of a 24-well plate.*A1 to D6/);
  });

  it('reads a quoted cell holding the separator as one cell (RFC 4180 §2 quoting [from memory])', () => {
    const parsed = parsePlateFile('# operator: "Ash, K."\n"time_s","A1"\n"0","0.5"\n30,0.6\n');
    expect(parsed.wells[0]!.absorbances).toEqual([0.5, 0.6]);
  });

  it('reports an unclosed quote at its line', () => {
    try {
      parsePlateFile('time_s,A1\n0,0.5\n30,"0.6\n');
      throw new Error('accepted');
    } catch (e) {
      expect((e as PlateImportError).issues[0]).toMatchObject({ code: 'BAD_QUOTING', row: 3 });
    }
  });
});
