import fc from 'fast-check';
import { linearRegression } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { MAX_PLATE_FILE_BYTES, plateWellIds } from '@/schemas/plate';
import { parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';
import {
  defaultSlopeFor,
  makePlateFile,
  syntheticAbsorbance,
} from '../../../factories/plate-file';

describe('makePlateFile round trip', () => {
  it('when a full 96-well, 60-point file is generated and parsed, then every reading comes back', () => {
    // Arrange
    const text = makePlateFile();
    // Act
    const parsed = parsePlateFile(Buffer.from(text, 'utf8'));
    // Assert
    expect(Buffer.byteLength(text)).toBeLessThan(MAX_PLATE_FILE_BYTES);
    expect(parsed.wavelengthNm).toBe(340);
    expect(parsed.timesS).toEqual(Array.from({ length: 60 }, (_, i) => i * 10));
    expect(parsed.wells.map((w) => w.well)).toEqual(plateWellIds);
    for (const w of parsed.wells) {
      const written = parsed.timesS.map((t) => Number(syntheticAbsorbance(t, w.well).toFixed(4)));
      expect(w.absorbances).toEqual(written);
    }
  });

  it('when each generated trace is fitted, then the slope put in is the slope that comes out', () => {
    // Reference: simple-statistics least squares [common practice]. Tolerance [derived]: each value
    // is rounded by at most 5e-5; for 60 points 10 s apart the slope moves by at most
    // 5e-5 * sum|t - mean| / sum (t - mean)^2 = 5e-5 * 9000 / 1 799 500 = 2.5e-7 per second.
    const slopeFor = (well: string) => defaultSlopeFor(well) * (well.startsWith('H') ? -1 : 1);
    const parsed = parsePlateFile(makePlateFile({ slopeFor, decimals: 4 }));

    for (const w of parsed.wells) {
      const { m } = linearRegression(parsed.timesS.map((t, i) => [t, w.absorbances[i]!]));
      expect(Math.abs(m - slopeFor(w.well) / 60)).toBeLessThanOrEqual(2.5e-7 + 1e-12);
    }
  });

  it('when wells, order, spacing, separator and decimals vary, then parsing still round-trips', () => {
    const wellsArb = fc
      .shuffledSubarray([...plateWellIds], { minLength: 1, maxLength: 96 })
      .chain((ws) => fc.shuffledSubarray(ws, { minLength: ws.length, maxLength: ws.length }));
    fc.assert(
      fc.property(
        wellsArb,
        fc.integer({ min: 2, max: 80 }),
        fc.constantFrom(0.5, 1, 7.5, 15, 30),
        fc.constantFrom('comma', 'tab') as fc.Arbitrary<'comma' | 'tab'>,
        fc.integer({ min: 2, max: 6 }),
        fc.double({ min: -0.2, max: 0.2, noNaN: true }),
        (wells, points, intervalS, delimiter, decimals, slope) => {
          const text = makePlateFile({ wells, points, intervalS, delimiter, decimals, slopeFor: () => slope });
          const parsed = parsePlateFile(text);
          expect(parsed.delimiter).toBe(delimiter);
          expect(parsed.timesS).toEqual(Array.from({ length: points }, (_, i) => i * intervalS));
          expect(parsed.wells.map((w) => w.well)).toEqual(wells);
          const first = parsed.wells[0]!;
          expect(first.absorbances.at(-1)).toBe(
            Number(syntheticAbsorbance((points - 1) * intervalS, first.well, () => slope).toFixed(decimals)),
          );
        },
      ),
      { numRuns: 60 },
    );
  });
});
