import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { linearRegression } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { mappedPlateSchema, type PlateMap, type PlateMapEntry } from '@/schemas/plate';
import { applyPlateMap, importPlateFile } from '../../../../server/domain/plate-import/apply-map';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';

/*
 * good-comma-ci.csv (see tests/fixtures/plates/README.md): header on line 5, wells A1 A2 B1 B2 in
 * columns 2-5, times 0..100 s every 20 s. Values below are copied from that file by hand.
 */
const fixture = readFileSync(
  path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../fixtures/plates/good-comma-ci.csv'),
);
const times = [0, 20, 40, 60, 80, 100];
const a1 = [0.912, 0.897, 0.881, 0.866, 0.85, 0.835];
const a2 = [0.905, 0.902, 0.899, 0.896, 0.893, 0.89];
const b1 = [0.118, 0.118, 0.117, 0.118, 0.118, 0.117];
const b2 = [0.12, 0.121, 0.12, 0.121, 0.12, 0.121];
const trace = (a: number[]) => times.map((t, i) => ({ t, a: a[i]! }));

function entry(
  well: string,
  role: PlateMapEntry['role'],
  over: Partial<PlateMapEntry> = {},
): PlateMapEntry {
  return { well, role, specimenRef: 'S1', assay: 'CI', replicate: 1, ...over };
}

function mapOf(...wells: PlateMapEntry[]): PlateMap {
  return { name: 'Fernhollow CI layout (invented)', wells };
}

function catchImport(fn: () => unknown): PlateImportError {
  try {
    fn();
  } catch (err) {
    if (err instanceof PlateImportError) return err;
    throw err;
  }
  throw new Error('expected a PlateImportError');
}

/** A map as it might arrive in a request body, before any checking. */
function rawMap(name: unknown, wells: unknown): PlateMap {
  return { name, wells } as unknown as PlateMap;
}

function mapIssues(map: PlateMap) {
  return catchImport(() => applyPlateMap(parsePlateFile(fixture), map)).issues;
}

describe('applyPlateMap', () => {
  it.each([
    ['the total is listed first', [entry('A1', 'total'), entry('A2', 'background'), entry('B1', 'blank')]],
    // A person may list a group's blank and background before its total; they belong to it all the same.
    [
      'blank and background are listed before the total',
      [entry('B1', 'blank'), entry('A2', 'background'), entry('A1', 'total')],
    ],
  ])('when total, background and blank are mapped and %s, then one group carries the three traces', (_label, wells) => {
    // Arrange
    const parsed = parsePlateFile(fixture);
    const map = mapOf(...wells);
    // Act
    const mapped = applyPlateMap(parsed, map);
    // Assert
    expect(mapped.groups).toEqual([
      {
        specimenRef: 'S1',
        assay: 'CI',
        replicate: 1,
        wells: { total: 'A1', background: 'A2', blank: 'B1' },
        total: trace(a1),
        background: trace(a2),
        blank: trace(b1),
      },
    ]);
    expect(mappedPlateSchema.safeParse(mapped).success).toBe(true);
  });

  it('when a file well is not in the map, then it is reported as a warning with its line and column', () => {
    const mapped = applyPlateMap(
      parsePlateFile(fixture),
      mapOf(entry('A1', 'total'), entry('A2', 'background'), entry('B1', 'blank')),
    );

    expect(mapped.warnings).toEqual([
      expect.objectContaining({ code: 'UNMAPPED_WELL', row: 5, column: 'B2', columnNumber: 5 }),
    ]);
    // What the user is told, in words: which well, and that its readings are left out [derived].
    expect(mapped.warnings[0]!.message).toContain('Well B2 is in the file but not in the plate map');
    expect(mapped.warnings[0]!.message).toContain('not used');
  });

  it('when the traces are handed on, then a straight-line fit sees seconds and the file’s readings', () => {
    // Reference: least-squares slope from simple-statistics [common practice], against the slope
    // worked by hand from A1's readings [derived]: t - mean(t) = -50, -30, -10, 10, 30, 50 s,
    // sum of squares 7000; sum of (t - mean) * a = -45.6 - 26.91 - 8.81 + 8.66 + 25.5 + 41.75
    // = -5.41; slope = -5.41 / 7000 = -7.7286e-4 per second.
    const [group] = applyPlateMap(parsePlateFile(fixture), mapOf(entry('A1', 'total'))).groups;
    const { m } = linearRegression(group!.total.map((p) => [p.t, p.a]));
    expect(m).toBeCloseTo(-5.41 / 7000, 10);
  });

  it('when the map names a well the file lacks, then nothing is returned and the well is named', () => {
    const parsed = parsePlateFile(fixture);
    const map = mapOf(entry('A1', 'total'), entry('C5', 'background'));

    const err = catchImport(() => applyPlateMap(parsed, map));

    expect(err.issues).toEqual([
      expect.objectContaining({ code: 'MISSING_WELL', row: 5, column: 'C5', columnNumber: null }),
    ]);
    expect(err.issues[0]!.message).toContain('S1 CI background, replicate 1');
  });

  it('when several mapped wells are missing, then each is listed once', () => {
    const map = mapOf(
      entry('H1', 'total'),
      entry('H2', 'blank'),
      entry('A1', 'total', { specimenRef: 'S2' }),
      entry('H2', 'blank', { specimenRef: 'S2' }),
    );

    const err = catchImport(() => applyPlateMap(parsePlateFile(fixture), map));

    expect(err.issues.map((i) => i.column)).toEqual(['H1', 'H2']);
    // Every use of the shared blank is named, so the user sees which groups lose it [derived].
    expect(err.issues[1]!.message).toBe(
      'The plate map uses well H2 (S1 CI blank, replicate 1; S2 CI blank, replicate 1) but the file has no H2 column.',
    );
  });

  it('when one blank well serves two specimens, then both groups get its trace', () => {
    const map = mapOf(
      entry('A1', 'total'),
      entry('B1', 'blank'),
      entry('A2', 'total', { specimenRef: 'S2' }),
      entry('B1', 'blank', { specimenRef: 'S2' }),
    );

    const mapped = applyPlateMap(parsePlateFile(fixture), map);

    expect(mapped.groups.map((g) => [g.specimenRef, g.wells.blank, g.blank])).toEqual([
      ['S1', 'B1', trace(b1)],
      ['S2', 'B1', trace(b1)],
    ]);
  });

  it('when groups are listed, then specimens keep map order and assays and replicates are sorted', () => {
    const map = mapOf(
      entry('B2', 'total', { specimenRef: 'S9', assay: 'CS', replicate: 2 }),
      entry('B1', 'total', { specimenRef: 'S9', assay: 'CS', replicate: 1 }),
      entry('A2', 'total', { specimenRef: 'S3', assay: 'CI' }),
      entry('A1', 'total', { specimenRef: 'S9', assay: 'CI' }),
    );

    const mapped = applyPlateMap(parsePlateFile(fixture), map);

    expect(mapped.groups.map((g) => `${g.specimenRef}/${g.assay}/${g.replicate}/${g.wells.total}`)).toEqual([
      'S9/CI/1/A1',
      'S9/CS/1/B1',
      'S9/CS/2/B2',
      'S3/CI/1/A2',
    ]);
    expect(mapped.groups[2]!.total).toEqual(trace(b2));
    expect(mapped.groups[2]!.background).toBeUndefined();
  });

  it.each([
    [
      'a well used twice for different roles',
      mapOf(entry('A1', 'total'), entry('A1', 'background')),
      'A1',
      'already mapped',
    ],
    [
      'a background without a total',
      mapOf(entry('A1', 'total'), entry('A2', 'background', { specimenRef: 'S2' })),
      'A2',
      'no total well',
    ],
    [
      'two totals in one group',
      mapOf(entry('A1', 'total'), entry('A2', 'total')),
      'A2',
      'already has a total well',
    ],
    [
      'a well that is not on a 96-well plate',
      mapOf(entry('Z9', 'total')),
      'Z9',
      'A1 to H12',
    ],
    [
      'a replicate of 0',
      mapOf(entry('A1', 'total', { replicate: 0 })),
      'A1',
      'Replicate',
    ],
  ])('when the map has %s, then it is refused as MAP_INVALID naming the well', (_label, map, well, text) => {
    const err = catchImport(() => applyPlateMap(parsePlateFile(fixture), map));

    expect(err.issues[0]).toMatchObject({ code: 'MAP_INVALID', column: well, row: null });
    expect(err.issues[0]!.message).toContain(text);
  });

  it('when the map has no wells, then it is refused', () => {
    const err = catchImport(() => applyPlateMap(parsePlateFile(fixture), mapOf()));
    expect(err.issues[0]).toMatchObject({ code: 'MAP_INVALID', column: null });
  });
});

/*
 * What a person reading a refusal should see, worked out by hand from the map they wrote [derived]: entries
 * are counted from 1 in the order they are listed, the entry's field is named in brackets, and a problem with
 * the map as a whole names the map's own field. After the colon comes the schema's own wording (src/schemas/
 * plate.ts), or zod's for a wrong type, of which only the type it names is checked.
 */
describe('applyPlateMap refusals name the entry and field', () => {
  it('when the second entry reuses a well, then the message counts it as entry 2 and names its well field', () => {
    const [issue] = mapIssues(mapOf(entry('A1', 'total'), entry('A1', 'background')));

    expect(issue).toEqual({
      code: 'MAP_INVALID',
      row: null,
      column: 'A1',
      columnNumber: null,
      message: 'Plate map entry 2 (well): Well A1 is already mapped (entry 1); only a blank can be shared',
    });
  });

  it('when the third entry is a second total of its group, then it is entry 3 and the role field is named', () => {
    const map = mapOf(entry('A1', 'total'), entry('B1', 'blank'), entry('A2', 'total'));

    const [issue] = mapIssues(map);

    expect(issue).toMatchObject({ column: 'A2' });
    expect(issue!.message).toBe('Plate map entry 3 (role): S1 CI replicate 1 already has a total well (A1)');
  });

  it('when an entry is not an object, then it is counted from 1 and no field or well is named', () => {
    // A JSON body can carry null or a bare well name where an entry belongs; entry 1 is good.
    const issues = mapIssues(rawMap('Fernhollow CI layout (invented)', [entry('A1', 'total'), null, 'A3']));

    expect(issues.map((i) => [i.code, i.column])).toEqual([
      ['MAP_INVALID', null],
      ['MAP_INVALID', null],
    ]);
    expect(issues[0]!.message).toMatch(/^Plate map entry 2: \S.*null/);
    expect(issues[1]!.message).toMatch(/^Plate map entry 3: \S.*string/);
  });

  it('when an entry’s well is a number, then the well field is named and no well is given as the column', () => {
    const map = rawMap('Fernhollow CI layout (invented)', [{ ...entry('A1', 'total'), well: 12 }]);

    const [issue] = mapIssues(map);

    expect(issue).toMatchObject({ code: 'MAP_INVALID', column: null });
    expect(issue!.message).toMatch(/^Plate map entry 1 \(well\): \S/);
  });

  it('when the map’s name is empty and it has no wells, then each problem names the map’s field', () => {
    const issues = mapIssues(rawMap('', []));

    expect(issues.map((i) => [i.column, i.message])).toEqual([
      [null, 'Plate map (name): Name is required'],
      [null, 'Plate map (wells): A plate map needs at least one well'],
    ]);
  });

  it('when the map itself is not an object, then the message names no field', () => {
    const [issue] = mapIssues(null as unknown as PlateMap);

    expect(issue).toMatchObject({ code: 'MAP_INVALID', column: null });
    expect(issue!.message).toMatch(/^Plate map: \S.*null/);
  });
});

describe('applyPlateMap group order', () => {
  it('when groups are interleaved with their blanks, then each group gets its own wells', () => {
    const map = mapOf(
      entry('B1', 'blank', { specimenRef: 'S2' }),
      entry('A1', 'total'),
      entry('B2', 'blank'),
      entry('A2', 'total', { specimenRef: 'S2' }),
    );

    const mapped = applyPlateMap(parsePlateFile(fixture), map);

    // S2 is named first (by its blank in entry 1), so its group comes first.
    expect(mapped.groups.map((g) => [g.specimenRef, g.wells, g.total, g.blank])).toEqual([
      ['S2', { total: 'A2', blank: 'B1' }, trace(a2), trace(b1)],
      ['S1', { total: 'A1', blank: 'B2' }, trace(a1), trace(b2)],
    ]);
  });
});

describe('importPlateFile', () => {
  it('when file and map are good, then both the parse and the groups are returned', () => {
    const { parsed, mapped } = importPlateFile(fixture, mapOf(entry('A1', 'total')));
    expect(parsed.wavelengthNm).toBe(340);
    expect(mapped.groups[0]!.total).toEqual(trace(a1));
    expect(mapped.warnings.map((w) => w.column)).toEqual(['A2', 'B1', 'B2']);
  });

  it('when the file is bad, then the file problem is reported before the map is looked at', () => {
    const err = catchImport(() => importPlateFile('time_s;A1\n', mapOf(entry('Z9', 'total'))));
    expect(err.issues.map((i) => i.code)).toEqual(['WRONG_DELIMITER']);
  });
});
