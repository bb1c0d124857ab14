import { MAX_PLATE_FILE_BYTES } from '@/schemas/plate';
import { failWith } from './errors';

/*
 * Turns the uploaded bytes into text, or fails before any parsing: too large, empty, or not
 * UTF-8 text. The byte length is checked first, before the content is looked at.
 */

/** Bytes a string takes in UTF-8, without allocating; stops counting once past `stopAfter`. */
export function utf8ByteLength(s: string, stopAfter = Number.POSITIVE_INFINITY): number {
  let n = 0;
  for (let i = 0; i < s.length && n <= stopAfter; i += 1) {
    const c = s.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length) {
      const d = s.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        n += 4;
        i += 1;
      } else n += 3; // lone surrogate: encoded as U+FFFD
    } else n += 3;
  }
  return n;
}

/**
 * Offset of the first byte that is not part of a well-formed UTF-8 sequence, or -1.
 * Well-formed sequences per the Unicode Standard, Table 3-7 (as in RFC 3629): no overlong forms,
 * no surrogates (ED A0..BF), nothing above U+10FFFF (F4 90.., F5..FF).
 */
export function findInvalidUtf8(bytes: Uint8Array): number {
  const n = bytes.length;
  let i = 0;
  const cont = (k: number, lo = 0x80, hi = 0xbf): boolean => {
    const b = bytes[k];
    return b !== undefined && b >= lo && b <= hi;
  };
  while (i < n) {
    const b = bytes[i]!;
    if (b < 0x80) {
      i += 1;
    } else if (b >= 0xc2 && b <= 0xdf) {
      if (!cont(i + 1)) return i;
      i += 2;
    } else if (b >= 0xe0 && b <= 0xef) {
      const lo = b === 0xe0 ? 0xa0 : 0x80;
      const hi = b === 0xed ? 0x9f : 0xbf;
      if (!cont(i + 1, lo, hi) || !cont(i + 2)) return i;
      i += 3;
    } else if (b >= 0xf0 && b <= 0xf4) {
      const lo = b === 0xf0 ? 0x90 : 0x80;
      const hi = b === 0xf4 ? 0x8f : 0xbf;
      if (!cont(i + 1, lo, hi) || !cont(i + 2) || !cont(i + 3)) return i;
      i += 4;
    } else {
      return i;
    }
  }
  return -1;
}

function lineOfByte(bytes: Uint8Array, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset; i += 1) {
    const b = bytes[i];
    // CR alone, LF alone and CR LF each end one line.
    if (b === 0x0a) line += 1;
    else if (b === 0x0d && bytes[i + 1] !== 0x0a) line += 1;
  }
  return line;
}

function lineOfChar(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset; i += 1) {
    const c = text.charCodeAt(i);
    if (c === 0x0a) line += 1;
    else if (c === 0x0d && text.charCodeAt(i + 1) !== 0x0a) line += 1;
  }
  return line;
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / (1024 * 1024)).toFixed(2)} MiB`;
}

const fatalDecoder = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false });

/** Decoded text without its byte-order mark. Throws PlateImportError. */
export function decodePlateText(input: Uint8Array | string): string {
  const size =
    typeof input === 'string' ? utf8ByteLength(input, MAX_PLATE_FILE_BYTES) : input.byteLength;
  if (size > MAX_PLATE_FILE_BYTES) {
    const shown = typeof input === 'string' ? 'is more than' : 'is';
    failWith(
      'FILE_TOO_LARGE',
      `The file ${shown} ${formatBytes(size)}; the largest plate file accepted is ${formatBytes(MAX_PLATE_FILE_BYTES)}.`,
    );
  }
  if (size === 0) failWith('EMPTY_FILE', 'The file is empty.');

  if (typeof input === 'string') return checkDecodedString(input);

  const b0 = input[0];
  const b1 = input[1];
  if ((b0 === 0xff && b1 === 0xfe) || (b0 === 0xfe && b1 === 0xff)) {
    failWith(
      'NOT_TEXT',
      'The file is saved as UTF-16 text; save or export it as UTF-8 (plain CSV or tab-separated text).',
      { row: 1 },
    );
  }
  const nul = input.indexOf(0);
  if (nul !== -1) {
    failWith(
      'NOT_TEXT',
      `The file is not plain text: it contains a NUL byte (byte ${nul + 1}). Upload the CSV or tab-separated text export, not a workbook or binary file.`,
      { row: lineOfByte(input, nul) },
    );
  }
  let text: string;
  try {
    text = fatalDecoder.decode(input);
  } catch {
    const bad = findInvalidUtf8(input);
    const at = bad === -1 ? 0 : bad;
    failWith(
      'NOT_TEXT',
      `The file is not valid UTF-8 text (byte ${at + 1}, value 0x${(input[at] ?? 0).toString(16).toUpperCase().padStart(2, '0')}). Save it as UTF-8.`,
      { row: lineOfByte(input, at) },
    );
  }
  if (text.length === 0) failWith('EMPTY_FILE', 'The file is empty.'); // a byte-order mark alone
  return text;
}

function checkDecodedString(input: string): string {
  const text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  if (text.length === 0) failWith('EMPTY_FILE', 'The file is empty.');
  const nul = text.indexOf('\u0000');
  if (nul !== -1) {
    failWith('NOT_TEXT', 'The file is not plain text: it contains a NUL character.', {
      row: lineOfChar(text, nul),
    });
  }
  // U+FFFD means the text was already decoded from something that was not UTF-8.
  const replacement = text.indexOf('\ufffd');
  if (replacement !== -1) {
    failWith(
      'NOT_TEXT',
      'The text contains the replacement character U+FFFD: the file was not UTF-8. Save it as UTF-8.',
      { row: lineOfChar(text, replacement) },
    );
  }
  for (let i = 0; i < text.length; i += 1) {
    const c = text.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdfff) {
      const pair =
        c <= 0xdbff && text.charCodeAt(i + 1) >= 0xdc00 && text.charCodeAt(i + 1) <= 0xdfff;
      if (!pair) {
        failWith('NOT_TEXT', 'The text contains an unpaired surrogate and is not valid Unicode.', {
          row: lineOfChar(text, i),
        });
      }
      i += 1;
    }
  }
  return text;
}
