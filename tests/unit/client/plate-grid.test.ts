import { describe, expect, it } from 'vitest';
import { blockWells, copyBlock, fillPattern, lastWell, parseWellSelection } from '@/utils/plate-grid';

/*
 * Plate geometry of the standard footprints, A1 top left, rows lettered, columns numbered (ANSI/SLAS 4-2004)
 * [from memory]: 24 wells = 4 rows × 6 columns, 96 = 8 × 12, 384 = 16 × 24 (rows A–P). Expected well lists
 * below are written out by hand from that definition.
 */

describe('plate geometry', () => {
  it('when the format is 24, 96 or 384, then the last well is D6, H12 or P24 [from memory]', () => {
    expect(lastWell(24)).toBe('D6');
    expect(lastWell(96)).toBe('H12');
    expect(lastWell(384)).toBe('P24');
  });
});

describe('parseWellSelection', () => {
  it('when a 384-well row is named, then its 24 wells come back left to right [from memory]', () => {
    const r = parseWellSelection('p', 384);
    expect(r.error).toBeNull();
    expect(r.wells).toHaveLength(24);
    expect(r.wells![0]).toBe('P1');
    expect(r.wells![23]).toBe('P24');
  });

  it('when a 384-well column is named, then its 16 wells come back top to bottom, A to P [from memory]', () => {
    const r = parseWellSelection('24', 384);
    expect(r.wells).toEqual('ABCDEFGHIJKLMNOP'.split('').map((l) => `${l}24`));
  });

  it('when a block is given corner to corner in either order, then the rectangle comes back row by row [derived]', () => {
    const expected = ['B2', 'B3', 'B4', 'C2', 'C3', 'C4'];
    expect(parseWellSelection('B2:C4', 96).wells).toEqual(expected);
    expect(parseWellSelection('c4-b2', 96).wells).toEqual(expected);
  });

  it('when parts overlap, then each well comes back once in the order first named [derived]', () => {
    expect(parseWellSelection('A1, A1:A3 2', 24).wells).toEqual(['A1', 'A2', 'A3', 'B2', 'C2', 'D2']);
  });

  it('when a well, row or column is off the plate, then the error names it and the plate size', () => {
    expect(parseWellSelection('E1', 24).error).toMatch(/“E1” is not a well of this 24-well plate \(A1 to D6\)/);
    expect(parseWellSelection('I', 96).error).toMatch(/Row I is not on a 96-well plate \(rows A to H\)/);
    expect(parseWellSelection('13', 96).error).toMatch(/Column 13 is not on a 96-well plate \(columns 1 to 12\)/);
    expect(parseWellSelection('A1:Q2', 384).error).toMatch(/“A1:Q2” is not a block/);
    expect(parseWellSelection('  ', 96).error).toMatch(/Name the wells/);
  });

  it('when P24 is asked of a 96-well plate, then it is refused; on 384 it is the last well [from memory]', () => {
    expect(parseWellSelection('P24', 96).wells).toBeNull();
    expect(parseWellSelection('P24', 384).wells).toEqual(['P24']);
  });
});

describe('fillPattern', () => {
  const brush = { role: 'total', replicate: 1, assay: 'CI' };

  it('when pairs per column are asked over C3:D6, then columns 3/5 are totals and 4/6 backgrounds, replicate 1 then 2 [derived]', () => {
    const out = fillPattern(blockWells('C3', 'D6', 96)!, brush, 'pairs-per-column');
    const at = (w: string) => out.find((e) => e.well === w)!;
    expect([at('C3').role, at('C3').replicate]).toEqual(['total', 1]);
    expect([at('D4').role, at('D4').replicate]).toEqual(['background', 1]);
    expect([at('C5').role, at('C5').replicate]).toEqual(['total', 2]);
    expect([at('D6').role, at('D6').replicate]).toEqual(['background', 2]);
    expect(out).toHaveLength(8);
  });

  it('when the replicate goes up per column, then it counts from the leftmost chosen column, not from column 1 [derived]', () => {
    const out = fillPattern(['A10', 'A12', 'B11'], { ...brush, replicate: 3 }, 'replicate-per-column');
    expect(out.map((e) => [e.well, e.replicate])).toEqual([
      ['A10', 3],
      ['A12', 5],
      ['B11', 4],
    ]);
  });
});

describe('copyBlock', () => {
  const entries = [
    { well: 'A1', tag: 'x' },
    { well: 'B2', tag: 'y' },
    { well: 'C3', tag: 'outside' },
  ];

  it('when A1:B2 is copied to O23 on 384 wells, then each entry keeps its offset: A1→O23, B2→P24 [derived]', () => {
    const r = copyBlock(entries, 'A1', 'B2', 384, 'O23');
    expect(r.error).toBeNull();
    expect(r.entries).toEqual([
      { well: 'O23', tag: 'x' },
      { well: 'P24', tag: 'y' },
    ]);
  });

  it('when the copy would run off the plate, then it is refused and names the well that falls off', () => {
    const r = copyBlock(entries, 'A1', 'B2', 96, 'H12');
    expect(r.entries).toBeNull();
    expect(r.error).toBe('Copying B2 to H12 would put it off the plate (past H12)');
  });

  it('when the source block is empty, then it says there is nothing to copy', () => {
    expect(copyBlock(entries, 'D1', 'D6', 24, 'A1').error).toBe('Nothing is laid out in D1:D6 to copy');
  });
});
