import { describe, expect, it } from 'vitest';
import { MAX_PLATE_FILE_BYTES } from '@/schemas/plate';
import { decodePlateText, findInvalidUtf8, formatBytes, utf8ByteLength } from '../../../../server/domain/plate-import/decode-text';
import { failWith, IssueList, PlateImportError } from '../../../../server/domain/plate-import/errors';

/*
 * The byte-level refusals of an uploaded plate file and the error that carries them. References: UTF-8 and its
 * byte-order mark, RFC 3629 [confirmed]; UTF-16 byte-order marks FF FE (little-endian) and FE FF (big-endian),
 * the Unicode Standard ch. 23 [from memory]; line endings CR LF, LF and a lone CR as in RFC 4180's CSV and
 * classic Mac text [common practice]; KiB = 1024 bytes, MiB = 1024² (IEC 80000-13 [confirmed]). House rule:
 * a refusal names the line it found (docs/plate-file-format.md).
 */
/** The PlateImportError `fn` throws (the test fails when it throws nothing or something else). */
function catchImport(fn: () => unknown): PlateImportError {
  let thrown: unknown = null;
  try { fn(); } catch (err) { thrown = err; }
  expect(thrown).toBeInstanceOf(PlateImportError);
  return thrown as PlateImportError;
}
const bytes = (s: string) => new Uint8Array(Buffer.from(s, 'utf8'));

describe('formatBytes (IEC binary prefixes)', () => {
  it('bytes below 1 KiB, KiB with one decimal below 1 MiB, MiB with two', () => {
    expect(formatBytes(0)).toBe('0 bytes');
    expect(formatBytes(1023)).toBe('1023 bytes');
    expect(formatBytes(1024)).toBe('1.0 KiB');
    expect(formatBytes(1536)).toBe('1.5 KiB');
    expect(formatBytes(1024 * 1024 - 1)).toBe('1024.0 KiB');
    expect(formatBytes(1024 * 1024)).toBe('1.00 MiB');
    expect(formatBytes(MAX_PLATE_FILE_BYTES)).toBe('2.00 MiB');
  });
});

describe('utf8ByteLength stops counting once past its limit', () => {
  it('counts all with no limit; with a limit, stops just past it', () => {
    expect(utf8ByteLength('abcdef')).toBe(6);
    expect(utf8ByteLength('abcdef', 2)).toBe(3);
    expect(utf8ByteLength('€€€', 3)).toBe(6);
  });
  it('a lone high surrogate at the end counts as U+FFFD (3 bytes), as Buffer.byteLength does', () => {
    expect(utf8ByteLength('a\ud800')).toBe(Buffer.byteLength('a\ud800', 'utf8'));
    expect(utf8ByteLength('\ud800a')).toBe(Buffer.byteLength('\ud800a', 'utf8'));
  });
});

describe('decodePlateText: bytes', () => {
  it('a UTF-8 byte-order mark is dropped', () => {
    expect(decodePlateText(new Uint8Array([0xef, 0xbb, 0xbf, 0x61]))).toBe('a');
  });

  it('UTF-16 in either byte order is refused at line 1 with the way out', () => {
    for (const bom of [
      [0xff, 0xfe],
      [0xfe, 0xff],
    ]) {
      const err = catchImport(() => decodePlateText(new Uint8Array([...bom, 0x74, 0x00])));
      expect(err.issues).toEqual([
        {
          code: 'NOT_TEXT',
          row: 1,
          column: null,
          columnNumber: null,
          message: 'The file is saved as UTF-16 text; save or export it as UTF-8 (plain CSV or tab-separated text).',
        },
      ]);
    }
  });

  it('FF alone or FE alone is not taken for UTF-16 (it is invalid UTF-8 instead)', () => {
    expect(catchImport(() => decodePlateText(new Uint8Array([0xff, 0x41]))).issues[0]!.message).toMatch(/^The file is not valid UTF-8/);
    expect(catchImport(() => decodePlateText(new Uint8Array([0xfe, 0x41]))).issues[0]!.message).toMatch(/^The file is not valid UTF-8/);
  });

  it('a NUL byte is named by its byte number and its line, counting CR LF, LF and lone CR as one line end each', () => {
    const err = catchImport(() => decodePlateText(bytes('a\r\nb\nc\rd\u0000')));
    expect(err.issues[0]).toMatchObject({
      code: 'NOT_TEXT',
      row: 4,
      message:
        'The file is not plain text: it contains a NUL byte (byte 9). Upload the CSV or tab-separated text export, not a workbook or binary file.',
    });
    // A NUL byte as the very first byte: byte 1, line 1.
    expect(catchImport(() => decodePlateText(new Uint8Array([0, 0x41]))).issues[0]).toMatchObject({ row: 1, message: expect.stringContaining('(byte 1)') });
  });

  it('an invalid byte is named by its number, its value in hex and its line', () => {
    // "ab\n" then C3 followed by "(" (not a continuation byte): byte 4, line 2.
    const err = catchImport(() => decodePlateText(new Uint8Array([0x61, 0x62, 0x0a, 0xc3, 0x28])));
    expect(err.issues[0]).toMatchObject({
      code: 'NOT_TEXT',
      row: 2,
      message: 'The file is not valid UTF-8 text (byte 4, value 0xC3). Save it as UTF-8.',
    });
    // A value below 0x10 is padded to two hex digits.
    const bad = catchImport(() => decodePlateText(new Uint8Array([0x0a, 0x0d, 0x0a, 0xe0, 0x80, 0x80])));
    expect(bad.issues[0]).toMatchObject({ row: 3, message: 'The file is not valid UTF-8 text (byte 4, value 0xE0). Save it as UTF-8.' });
  });

  it('an empty buffer is empty', () => {
    expect(catchImport(() => decodePlateText(new Uint8Array([]))).issues[0]).toMatchObject({ code: 'EMPTY_FILE', message: 'The file is empty.' });
  });

  it('a buffer over the limit says “is”, a string over it says “is more than”', () => {
    const over = catchImport(() => decodePlateText(new Uint8Array(MAX_PLATE_FILE_BYTES + 1)));
    expect(over.issues[0]!.message).toBe(
      'The file is 2.00 MiB; the largest plate file accepted is 2.00 MiB.',
    );
    const s = catchImport(() => decodePlateText('x'.repeat(MAX_PLATE_FILE_BYTES + 10)));
    expect(s.issues[0]!.message).toMatch(/^The file is more than 2\.00 MiB; the largest plate file accepted is 2\.00 MiB\.$/);
  });
});

describe('decodePlateText: strings', () => {
  it('a byte-order mark at the start of a string is dropped; an empty string is empty', () => {
    expect(decodePlateText('\ufeffabc')).toBe('abc');
    expect(catchImport(() => decodePlateText('')).issues[0]!.code).toBe('EMPTY_FILE');
  });

  it('a NUL character is named by its line (lone CR ends a line)', () => {
    expect(catchImport(() => decodePlateText('a\rb\r\nc\u0000')).issues[0]).toMatchObject({
      code: 'NOT_TEXT',
      row: 3,
      message: 'The file is not plain text: it contains a NUL character.',
    });
  });

  it('U+FFFD is named by its line with the reason', () => {
    expect(catchImport(() => decodePlateText('a\nb\ufffd')).issues[0]).toMatchObject({
      row: 2,
      message: 'The text contains the replacement character U+FFFD: the file was not UTF-8. Save it as UTF-8.',
    });
  });

  it('a surrogate pair is text; a low surrogate alone or a high one at the end is not', () => {
    expect(decodePlateText('a😀b')).toBe('a😀b');
    expect(catchImport(() => decodePlateText('a\n\udc00')).issues[0]).toMatchObject({
      row: 2,
      message: 'The text contains an unpaired surrogate and is not valid Unicode.',
    });
    expect(catchImport(() => decodePlateText('abc\ud83d')).issues[0]!.row).toBe(1);
    expect(catchImport(() => decodePlateText('\ud83dx')).issues[0]!.code).toBe('NOT_TEXT');
  });
});

describe('PlateImportError and IssueList', () => {
  it('one issue: its location and message, no “more”', () => {
    const err = catchImport(() => failWith('EMPTY_CELL', 'No reading for well A1.', { row: 3, column: 'A1', columnNumber: 2 }));
    expect(err.message).toBe('The plate file could not be imported: Line 3, column A1 (2): No reading for well A1.');
    expect(err.totalIssues).toBe(1);
    expect(err.issues).toEqual([{ code: 'EMPTY_CELL', row: 3, column: 'A1', columnNumber: 2, message: 'No reading for well A1.' }]);
  });

  it('two issues: “and 1 more”; a location left out is null', () => {
    const list = new IssueList();
    list.add('EMPTY_CELL', 'first');
    list.add('EMPTY_CELL', 'second', { row: 4 });
    expect(list.size).toBe(2);
    const err = catchImport(() => list.throwIfAny());
    expect(err.message).toBe('The plate file could not be imported: first (and 1 more)');
    expect(err.issues[0]).toEqual({ code: 'EMPTY_CELL', row: null, column: null, columnNumber: null, message: 'first' });
  });

  it('the cap keeps the first issues and counts the rest', () => {
    const list = new IssueList(2);
    for (const m of ['a', 'b', 'c']) list.add('EMPTY_CELL', m);
    const err = catchImport(() => list.fail());
    expect(err.issues.map((i) => i.message)).toEqual(['a', 'b']);
    expect(err.totalIssues).toBe(3);
    expect(list.size).toBe(3);
  });

  it('throwIfAny does nothing when the list is empty', () => {
    expect(() => new IssueList().throwIfAny()).not.toThrow();
  });

  it('an error built with no issue says so', () => {
    expect(new PlateImportError([]).message).toBe('The plate file could not be imported: unknown problem');
  });
});

/*
 * Every boundary of the Unicode Standard's Table 3-7 (well-formed UTF-8: lead bytes C2–DF, E0–EF, F0–F4; second
 * byte A0–BF after E0, 80–9F after ED, 90–BF after F0, 80–8F after F4; other continuation bytes 80–BF) [from
 * memory], checked exhaustively against Node's TextDecoder in fatal mode, which implements the WHATWG Encoding
 * Standard's UTF-8 decoder [confirmed: Node documents TextDecoder as the WHATWG Encoding API], and Node's
 * Buffer.byteLength [confirmed: Node's Buffer documentation] for the byte count.
 */
describe('UTF-8 boundaries, exhaustively', () => {
  const decoder = new TextDecoder('utf-8', { fatal: true });
  const decodes = (b: number[]) => {
    try {
      decoder.decode(new Uint8Array(b));
      return true;
    } catch {
      return false;
    }
  };
  /** The first bad offset is right when the bytes before it decode and one more byte does not. */
  const disagreement = (b: number[]): string | null => {
    const bad = findInvalidUtf8(new Uint8Array(b));
    const hex = b.map((x) => x.toString(16).padStart(2, '0')).join(' ');
    if (bad === -1) return decodes(b) ? null : `${hex}: said valid, the decoder refuses it`;
    if (!decodes(b)) {
      if (decodes(b.slice(0, bad)) && !decodes(b.slice(0, bad + 1))) return null;
      return `${hex}: first bad byte ${bad} is not where the well-formed part ends`;
    }
    return `${hex}: said invalid at ${bad}, the decoder accepts it`;
  };

  it('every lead byte 80–FF with every second byte, followed by none, one or two continuation bytes', () => {
    const wrong: string[] = [];
    for (let lead = 0x80; lead <= 0xff; lead += 1) {
      for (let second = 0; second <= 0xff; second += 1) {
        for (const tail of [[], [0x80], [0x80, 0x80]]) {
          const d = disagreement([0x41, lead, second, ...tail]);
          if (d) wrong.push(d);
        }
      }
    }
    expect(wrong).toEqual([]);
  });

  it('every third byte after each three- and four-byte lead (with its lowest and highest valid second byte)', () => {
    const wrong: string[] = [];
    const seconds: Record<number, number[]> = { 0xe0: [0xa0, 0xbf], 0xed: [0x80, 0x9f], 0xf0: [0x90, 0xbf], 0xf4: [0x80, 0x8f] };
    for (const lead of [0xe0, 0xe1, 0xec, 0xed, 0xee, 0xef, 0xf0, 0xf1, 0xf3, 0xf4]) {
      for (const second of seconds[lead] ?? [0x80, 0xbf]) {
        for (let third = 0; third <= 0xff; third += 1) {
          const d = disagreement(lead >= 0xf0 ? [0x41, lead, second, third, 0x80] : [0x41, lead, second, third]);
          if (d) wrong.push(d);
        }
      }
    }
    expect(wrong).toEqual([]);
  });

  it('every fourth byte after each four-byte lead', () => {
    const wrong: string[] = [];
    for (const [lead, second] of [[0xf0, 0x90], [0xf1, 0x80], [0xf4, 0x8f]] as const) {
      for (let fourth = 0; fourth <= 0xff; fourth += 1) {
        const d = disagreement([0x41, lead, second, 0xbf, fourth]);
        if (d) wrong.push(d);
      }
    }
    expect(wrong).toEqual([]);
  });

  it('byte counts at each code-point boundary agree with Buffer.byteLength, lone surrogates counting as U+FFFD', () => {
    const points = [0x7f, 0x80, 0x7ff, 0x800, 0xd7ff, 0xe000, 0xfffd, 0xffff, 0x10000, 0x10ffff];
    const units = [0xd800, 0xdbff, 0xdc00, 0xdfff];
    const samples = [
      ...points.map((cp) => String.fromCodePoint(cp)),
      ...units.map((u) => String.fromCharCode(u)),
      ...units.map((u) => `${String.fromCharCode(u)}a`),
      '\udbff\udbff\udfff',
      '\ud800\ue000',
      '\udc00\ud800',
    ];
    for (const s of samples) expect([s, utf8ByteLength(s)]).toEqual([s, Buffer.byteLength(s, 'utf8')]);
  });
});

/*
 * Surrogates and line ends, worked by hand. UTF-16 (the Unicode Standard, ch. 3, D91 and Table 3-5; RFC 2781 §2.1)
 * [from memory]: a code point U above FFFF is written as the pair W1 = D800 + the top 10 bits of U − 10000 and
 * W2 = DC00 + its low 10 bits, so a high surrogate (D800–DBFF) is only ever followed by a low one (DC00–DFFF) and a
 * low one only ever follows a high one. Worked: U+10000 → D800 DC00; U+10FFFF (U − 10000 = FFFFF) → DBFF DFFF;
 * U+1F600 (F600: top bits 3D, low bits 200) → D83D DE00. U+E000 is the first code point after the surrogate block.
 * UTF-8 byte counts (RFC 3629 §3) [confirmed]: U+0800–U+FFFF take 3 bytes (U+3042 → E3 81 82), U+10000 and up 4;
 * a lone surrogate cannot be encoded and is written as U+FFFD (EF BF BD, 3 bytes), as Node's Buffer does.
 */
describe('surrogate pairs by hand (D91, Table 3-5, RFC 2781)', () => {
  it('the hand-worked pairs are the ones the JavaScript engine writes for those code points', () => {
    // An independent check of the working above, not of the code under test.
    expect(String.fromCodePoint(0x10000)).toBe('\ud800\udc00');
    expect(String.fromCodePoint(0x10ffff)).toBe('\udbff\udfff');
    expect(String.fromCodePoint(0x1f600)).toBe('\ud83d\ude00');
  });

  it('utf8ByteLength: a low surrogate after anything but a high one is a lone surrogate of 3 bytes, not half a pair', () => {
    expect(utf8ByteLength('\u3042\udc00')).toBe(3 + 3); // U+3042, then a lone low surrogate
    expect(utf8ByteLength('\udc00\udc00')).toBe(3 + 3); // two lone low surrogates
    expect(utf8ByteLength('\ue000\udc00')).toBe(3 + 3); // U+E000, then a lone low surrogate
    expect(utf8ByteLength('\ud800\u3042')).toBe(3 + 3); // a lone high surrogate, then U+3042
    expect(utf8ByteLength('\ud800\udc00\udbff\udfff')).toBe(4 + 4); // U+10000 and U+10FFFF
  });

  it('decodePlateText: the pairs at both ends of the range are text, also as the very first characters', () => {
    for (const s of ['\ud800\udc00', '\udbff\udfff', '\ud83d\ude00 well A1', 'A1\t\ud800\udfff\t\udbff\udc00']) {
      expect(decodePlateText(s)).toBe(s);
    }
    // U+E000 and U+FFFF lie outside the surrogate block: ordinary characters.
    expect(decodePlateText('a\ue000\uffff')).toBe('a\ue000\uffff');
  });

  it('decodePlateText: every unpaired surrogate is refused on its own line', () => {
    const unpaired = 'The text contains an unpaired surrogate and is not valid Unicode.';
    const cases: Array<[string, number]> = [
      ['a\n\udfff', 2], // the last low surrogate, alone
      ['a\n\udc00\udc00', 2], // two low surrogates: the second does not pair the first
      ['a\r\nb\n\ud800\ue000', 3], // a high surrogate followed by U+E000
      ['\ud800\ue000', 1],
      ['\udbff\udbff', 1], // two high surrogates
    ];
    for (const [s, row] of cases) {
      expect([s, catchImport(() => decodePlateText(s)).issues[0]]).toEqual([
        s,
        { code: 'NOT_TEXT', row, column: null, columnNumber: null, message: unpaired },
      ]);
    }
  });
});

describe('line numbers, byte numbers and empty texts (hand-worked)', () => {
  // CR LF, LF and a lone CR each end one line [common practice]; a person counts lines and bytes from 1.
  it('in a string, CR LF ends one line, not two, and a lone CR ends one', () => {
    expect(catchImport(() => decodePlateText('a\r\nb\u0000')).issues[0]!.row).toBe(2);
    expect(catchImport(() => decodePlateText('a\r\n\r\nb\ufffd')).issues[0]!.row).toBe(3);
    expect(catchImport(() => decodePlateText('a\rb\u0000')).issues[0]!.row).toBe(2);
    expect(catchImport(() => decodePlateText('a\r\n\rb\n\udc00')).issues[0]!.row).toBe(4);
  });

  it('a second byte FE or FF after an ordinary first byte is invalid UTF-8 at byte 2, not UTF-16', () => {
    // FE and FF never appear in UTF-8 (RFC 3629 §1) [confirmed]; "A" is byte 1, the bad byte is byte 2.
    for (const [second, hex] of [[0xfe, 'FE'], [0xff, 'FF']] as const) {
      expect(catchImport(() => decodePlateText(new Uint8Array([0x41, second, 0x42]))).issues[0]).toEqual({
        code: 'NOT_TEXT',
        row: 1,
        column: null,
        columnNumber: null,
        message: `The file is not valid UTF-8 text (byte 2, value 0x${hex}). Save it as UTF-8.`,
      });
    }
  });

  it('a byte-order mark and nothing else is an empty file, as bytes and as a string', () => {
    // The mark is not part of the text (RFC 3629 §6) [confirmed]: EF BB BF alone, or U+FEFF alone, leaves nothing.
    const empty = { code: 'EMPTY_FILE', row: null, column: null, columnNumber: null, message: 'The file is empty.' };
    expect(catchImport(() => decodePlateText(new Uint8Array([0xef, 0xbb, 0xbf]))).issues).toEqual([empty]);
    expect(catchImport(() => decodePlateText('\ufeff')).issues).toEqual([empty]);
  });
});
