import { describe, expect, it } from 'vitest';
import {
  createPlateMapInputSchema,
  describePlateIssue,
  normaliseWellId,
  plateMapSchema,
  plateWellIds,
  updatePlateMapInputSchema,
  wellIdSchema,
} from '@/schemas/plate';

describe('well ids', () => {
  it('when the plate is listed, then it has 8 rows x 12 columns in reading order', () => {
    // 96-well positions, rows A-H and columns 1-12, A1 top left: ANSI/SLAS 4-2004 [from memory].
    expect(plateWellIds).toHaveLength(96);
    expect(new Set(plateWellIds).size).toBe(96);
    expect([plateWellIds[0], plateWellIds[11], plateWellIds[12], plateWellIds[95]]).toEqual([
      'A1',
      'A12',
      'B1',
      'H12',
    ]);
  });

  it.each([
    ['B3', 'B3'],
    ['b3', 'B3'],
    ['B03', 'B3'],
    [' h12 ', 'H12'],
    ['A010', 'A10'],
    ['A0', null],
    ['A13', null],
    ['I1', null],
    ['AA1', null],
    ['B 3', null],
    ['', null],
  ])('when "%s" is read as a well, then it is %s', (raw, expected) => {
    expect(normaliseWellId(raw)).toBe(expected);
  });

  it('when a map entry uses a non-canonical well, then the schema asks for A1..H12', () => {
    for (const w of ['a1', 'A01', 'A13', 'I1']) expect(wellIdSchema.safeParse(w).success).toBe(false);
    for (const w of plateWellIds) expect(wellIdSchema.safeParse(w).success).toBe(true);
  });
});

describe('plate map schemas', () => {
  const valid = {
    name: '  Fernhollow CS layout (invented)  ',
    wells: [
      { well: 'A1', specimenRef: 'S1', assay: 'CS', role: 'total', replicate: 1 },
      { well: 'A2', specimenRef: 'S1', assay: 'CS', role: 'background', replicate: 1 },
    ],
  };

  it('when a template is saved with a description, then the input schema accepts and trims it', () => {
    const parsed = createPlateMapInputSchema.parse({ ...valid, description: ' two wells ' });
    expect(parsed.name).toBe('Fernhollow CS layout (invented)');
    expect(parsed.description).toBe('two wells');
  });

  it('when a template is renamed only, then the update schema accepts a partial body', () => {
    expect(updatePlateMapInputSchema.parse({ name: 'New name' })).toEqual({ name: 'New name' });
  });

  it('when a template is updated with a bad well list, then the cross-entry rules still apply', () => {
    const result = updatePlateMapInputSchema.safeParse({
      wells: [{ well: 'A2', specimenRef: 'S1', assay: 'CS', role: 'blank', replicate: 1 }],
    });
    expect(result.success).toBe(false);
  });

  it('when a rule fails, then the error path points at the entry and field', () => {
    const result = plateMapSchema.safeParse({
      ...valid,
      wells: [...valid.wells, { well: 'A1', specimenRef: 'S2', assay: 'CS', role: 'total', replicate: 1 }],
    });
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((i) => i.path)).toEqual([['wells', 2, 'well']]);
  });

  it.each([
    ['an empty specimen label', { specimenRef: '   ' }],
    ['a control character in the label', { specimenRef: 'S\u00071' }],
    ['an unknown assay', { assay: 'CV' }],
    ['an unknown role', { role: 'control' }],
    ['a fractional replicate', { replicate: 1.5 }],
  ])('when an entry has %s, then it is refused', (_label, change) => {
    const result = plateMapSchema.safeParse({ ...valid, wells: [{ ...valid.wells[0], ...change }] });
    expect(result.success).toBe(false);
  });
});

describe('describePlateIssue', () => {
  it('when an issue has line and column, then both lead the text', () => {
    expect(
      describePlateIssue({ code: 'NOT_A_NUMBER', row: 7, column: 'B3', columnNumber: 4, message: 'Bad.' }),
    ).toBe('Line 7, column B3 (4): Bad.');
  });

  it('when an issue concerns the whole file, then only the message is given', () => {
    expect(
      describePlateIssue({ code: 'EMPTY_FILE', row: null, column: null, columnNumber: null, message: 'Empty.' }),
    ).toBe('Empty.');
  });
});
