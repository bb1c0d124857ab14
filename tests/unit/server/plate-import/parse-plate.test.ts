import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { MAX_PLATE_FILE_BYTES, MAX_PLATE_ISSUES } from '@/schemas/plate';
import {
  decodePlateText,
  findInvalidUtf8,
  utf8ByteLength,
} from '../../../../server/domain/plate-import/decode-text';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { parseDecimal, parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';

const corpusDir = path.resolve(
  path.dirname(fileURLToPath(import.meta.url)),
  '../../../fixtures/plates',
);

function catchImport(fn: () => unknown): PlateImportError {
  try {
    fn();
  } catch (err) {
    if (err instanceof PlateImportError) return err;
    throw err;
  }
  throw new Error('expected a PlateImportError, but the input was accepted');
}

const small = 'time_s,A1\n0,0.9\n10,0.8\n';

describe('size limit', () => {
  it('when a buffer is one byte over the limit, then it is refused before its content is read', () => {
    // Arrange: NUL bytes would be NOT_TEXT; the size must be checked first.
    const bytes = new Uint8Array(MAX_PLATE_FILE_BYTES + 1);
    // Act
    const err = catchImport(() => parsePlateFile(bytes));
    // Assert
    expect(err.issues).toEqual([
      expect.objectContaining({ code: 'FILE_TOO_LARGE', row: null, column: null }),
    ]);
    expect(err.issues[0]!.message).toContain('2.00 MiB');
  });

  it('when a valid file is exactly at the limit, then it is accepted', () => {
    const padding = MAX_PLATE_FILE_BYTES - Buffer.byteLength(small) - 2; // "#" and "\n"
    const text = `#${'x'.repeat(padding)}\n${small}`;
    const bytes = Buffer.from(text, 'utf8');
    expect(bytes.byteLength).toBe(MAX_PLATE_FILE_BYTES);

    expect(parsePlateFile(bytes).timesS).toEqual([0, 10]);
  });

  it('when a string is over the limit in UTF-8 bytes but not in characters, then it is refused', () => {
    // "µ" (U+00B5) takes two bytes in UTF-8 (RFC 3629 [from memory]; checked with Buffer.byteLength).
    const text = `# ${'µ'.repeat(MAX_PLATE_FILE_BYTES / 2)}\n${small}`;
    expect(text.length).toBeLessThan(MAX_PLATE_FILE_BYTES);
    expect(Buffer.byteLength(text, 'utf8')).toBeGreaterThan(MAX_PLATE_FILE_BYTES);

    expect(catchImport(() => parsePlateFile(text)).issues[0]!.code).toBe('FILE_TOO_LARGE');
  });

  it('when strings of any code units are measured, then the count matches Buffer.byteLength', () => {
    // Reference: Node's own UTF-8 encoder (lone surrogates become U+FFFD, 3 bytes).
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 60 }), (s) => {
        expect(utf8ByteLength(s)).toBe(Buffer.byteLength(s, 'utf8'));
      }),
      { numRuns: 300 },
    );
  });
});

describe('text checks', () => {
  it('when byte sequences are checked, then the verdict matches the WHATWG TextDecoder in fatal mode', () => {
    // Reference: Node's TextDecoder (WHATWG Encoding Standard) [common practice]. Inputs mix random
    // bytes with valid UTF-8 that has one byte replaced, so both outcomes are exercised.
    const decoder = new TextDecoder('utf-8', { fatal: true });
    const validWithOneChange = fc
      .tuple(fc.string({ unit: 'grapheme', minLength: 1, maxLength: 20 }), fc.nat(), fc.integer({ min: 0, max: 255 }))
      .map(([s, at, byte]) => {
        const b = new Uint8Array(Buffer.from(s, 'utf8'));
        b[at % b.length] = byte;
        return b;
      });
    fc.assert(
      fc.property(fc.oneof(fc.uint8Array({ maxLength: 24 }), validWithOneChange), (bytes) => {
        let ok = true;
        try {
          decoder.decode(bytes);
        } catch {
          ok = false;
        }
        const bad = findInvalidUtf8(bytes);
        expect(bad === -1).toBe(ok);
        if (bad !== -1) {
          // Everything before the first bad sequence is well-formed.
          expect(() => decoder.decode(bytes.slice(0, bad))).not.toThrow();
        }
      }),
      { numRuns: 500 },
    );
  });

  it.each([
    // Unicode Standard Table 3-7, well-formed byte sequences [from memory]
    ['overlong NUL C0 80', [0x41, 0xc0, 0x80], 1],
    ['overlong three-byte E0 80 80', [0xe0, 0x80, 0x80], 0],
    ['surrogate ED A0 80', [0x41, 0x42, 0xed, 0xa0, 0x80], 2],
    ['above U+10FFFF F4 90 80 80', [0xf4, 0x90, 0x80, 0x80], 0],
    ['truncated two-byte at the end', [0x41, 0xc3], 1],
    ['U+1F600 F0 9F 98 80 is valid', [0xf0, 0x9f, 0x98, 0x80], -1],
    ['U+00E9 C3 A9 is valid', [0xc3, 0xa9], -1],
  ])('when the bytes are %s, then the first bad offset is %#', (_label, bytes, expected) => {
    expect(findInvalidUtf8(new Uint8Array(bytes))).toBe(expected);
  });

  it('when decoded text holds a NUL character, then it is not text and the line is named', () => {
    const err = catchImport(() => parsePlateFile('time_s,A1\n0,0.9\n10,0.8\u0000\n'));
    expect(err.issues[0]).toMatchObject({ code: 'NOT_TEXT', row: 3 });
  });

  it('when decoded text holds U+FFFD, then it is refused as text that was not UTF-8', () => {
    // U+FFFD is what a lenient decoder puts in place of bytes it could not read.
    const text = readFileSync(path.join(corpusDir, 'bad-latin1.csv'), 'utf8');
    expect(text).toContain('\ufffd');

    const err = catchImport(() => parsePlateFile(text));

    expect(err.issues[0]).toMatchObject({ code: 'NOT_TEXT', row: 2 });
  });

  it('when decoded text holds an unpaired surrogate, then it is refused', () => {
    const err = catchImport(() => parsePlateFile('time_s,A1\n0,0.9\n\ud800\n'));
    expect(err.issues[0]).toMatchObject({ code: 'NOT_TEXT', row: 3 });
  });

  it('when the text is only a byte-order mark, then the file is empty', () => {
    expect(catchImport(() => parsePlateFile('\ufeff')).issues[0]!.code).toBe('EMPTY_FILE');
    expect(catchImport(() => decodePlateText(new Uint8Array([0xef, 0xbb, 0xbf]))).issues[0]).toMatchObject({
      code: 'EMPTY_FILE',
      row: null,
    });
  });
});

describe('numbers', () => {
  it('when any finite double is written the way JavaScript prints it, then it reads back exactly', () => {
    // Reference: ECMAScript Number::toString round-trips every double [common practice].
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        expect(parseDecimal(String(x))).toBe(x === 0 ? 0 : x);
      }),
      { numRuns: 500 },
    );
  });

  it('when a double is written with fixed decimals, then it reads as Number() reads it', () => {
    fc.assert(
      fc.property(fc.double({ min: -10, max: 10, noNaN: true }), fc.integer({ min: 0, max: 8 }), (x, d) => {
        const s = x.toFixed(d);
        expect(parseDecimal(s)).toBe(Number(s));
      }),
      { numRuns: 300 },
    );
  });

  it.each(['', 'NaN', 'Infinity', '-Infinity', '1e999', '0x10', '0b1', '1,5', '1.2.3', '--1', '1e', '.', 'e5', '1 000'])(
    'when a cell is "%s", then it is not a number (even where Number() would accept it)',
    (cell) => {
      expect(parseDecimal(cell)).toBeNull();
    },
  );
});

describe('all problems at once', () => {
  it('when a file has more than the cap, then the first 50 are listed in file order and all are counted', () => {
    const bytes = readFileSync(path.join(corpusDir, 'bad-many-problems.csv'));

    const err = catchImport(() => parsePlateFile(bytes));

    // The fixture has 8 readings (lines 2-9) x 8 wells (A1..A8, columns 2-9), each "x"; issue k
    // (from 0) is on line 2 + floor(k / 8), well A(k mod 8 + 1). k = 49 -> line 8, A2.
    expect(err.issues).toHaveLength(MAX_PLATE_ISSUES);
    expect(err.totalIssues).toBe(64);
    expect(err.issues[49]).toMatchObject({ row: 8, column: 'A2', columnNumber: 3 });
    expect(err.message).toContain('and 63 more');
  });

  it('when the header and the readings both have problems, then both are reported', () => {
    const text = 'time_s,A1,Q7\n0,0.9,0.8\n10,abc,0.7\n5,0.7,0.6\n';

    const err = catchImport(() => parsePlateFile(text));

    expect(err.issues.map((i) => [i.code, i.row, i.column])).toEqual([
      ['BAD_WELL_NAME', 1, 'Q7'],
      ['NOT_A_NUMBER', 3, 'A1'],
      ['TIME_NOT_INCREASING', 4, 'time_s'],
    ]);
  });

  it('when a file fails, then the error is a PlateImportError and an Error', () => {
    const err = catchImport(() => parsePlateFile('time_s;A1\n'));
    expect(err).toBeInstanceOf(Error);
    expect(err.name).toBe('PlateImportError');
    expect(err.code).toBe('PLATE_IMPORT_FAILED');
    expect(err.message).toMatch(/^The plate file could not be imported: Line 1:/);
  });
});

describe('header and metadata', () => {
  it('when the time column is written in capitals, then it is still the time column', () => {
    expect(parsePlateFile('TIME_S,A1\n0,0.9\n10,0.8\n').timesS).toEqual([0, 10]);
  });

  it('when comment keys name object internals, then they stay plain data or free text', () => {
    // Keys start with a letter, so "__proto__" is a free comment; "constructor" is ordinary data.
    const parsed = parsePlateFile(`# __proto__: polluted\n# constructor: kept\n${small}`);
    expect(parsed.metadata).toEqual({ constructor: 'kept' });
    expect(Object.getPrototypeOf(parsed.metadata)).toBe(Object.prototype);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it('when a comment key is given twice, then the second line is reported', () => {
    const err = catchImport(() => parsePlateFile(`# wavelength_nm: 340\n# wavelength_nm: 412\n${small}`));
    expect(err.issues).toEqual([
      expect.objectContaining({ code: 'BAD_METADATA', row: 2, message: expect.stringContaining('line 1') }),
    ]);
  });

  it('when the header has only the time column, then no well columns is reported', () => {
    const err = catchImport(() => parsePlateFile('time_s\n0\n10\n'));
    expect(err.issues[0]).toMatchObject({ code: 'NO_WELL_COLUMNS', row: 1 });
  });

  it('when a comma file has a tab-separated reading, then the line is named with a hint', () => {
    const err = catchImport(() => parsePlateFile('time_s,A1,A2\n0,0.9,0.8\n10\t0.8\t0.7\n'));
    expect(err.issues).toEqual([
      expect.objectContaining({ code: 'COLUMN_COUNT', row: 3, column: 'A1', columnNumber: 2 }),
    ]);
    expect(err.issues[0]!.message).toContain('tabs');
  });
});
