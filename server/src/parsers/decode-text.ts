import { ParseError, showCell } from './parse-error';
import type { ParseRules } from './parse-rules';

/** Larger files are refused before any decoding. */
export const MAX_FILE_BYTES = 20 * 1024 * 1024;

const UTF8_BOM = [0xef, 0xbb, 0xbf];
const UTF16LE_BOM = [0xff, 0xfe];
const UTF16BE_BOM = [0xfe, 0xff];
// UTF-8 multi-byte characters (°, µ, é, …) read as latin1 show up as Â or Ã before a high character.
const UTF8_READ_AS_LATIN1 = /[\u00c2\u00c3][\u0080-\u00bf]/;

export interface DecodedText {
  text: string;
  warnings: string[];
}

function startsWith(content: Buffer, bytes: number[]): boolean {
  return bytes.every((b, i) => content[i] === b);
}

function lineOfIndex(text: string, index: number): number {
  let line = 1;
  for (let i = text.indexOf('\n'); i !== -1 && i < index; i = text.indexOf('\n', i + 1)) line++;
  return line;
}

function lineOfByte(content: Buffer, offset: number): number {
  let line = 1;
  for (let i = content.indexOf(0x0a); i !== -1 && i < offset; i = content.indexOf(0x0a, i + 1)) line++;
  return line;
}

/** Share of characters that are neither printable Latin-1 nor common whitespace. */
function oddCharacterShare(text: string): number {
  const sample = text.slice(0, 4096);
  if (sample.length === 0) return 0;
  let odd = 0;
  for (const ch of sample) {
    const code = ch.codePointAt(0) ?? 0;
    const usual = code === 9 || code === 10 || code === 13 || (code >= 32 && code < 0x250) || code === 0xb0;
    if (!usual) odd++;
  }
  return odd / sample.length;
}

/**
 * Decodes the raw bytes with the encoding of the profile, dropping a byte-order mark.
 * Binary content, bytes that are not valid in the declared encoding and oversize
 * files are refused with a message that says what the file seems to be instead.
 */
export function decodeText(content: Buffer, file: string, encoding: ParseRules['encoding']): DecodedText {
  if (content.length > MAX_FILE_BYTES) {
    throw new ParseError({
      file,
      detail: `the file is ${(content.length / 1024 / 1024).toFixed(1)} MB; the limit is ${MAX_FILE_BYTES / 1024 / 1024} MB`,
    });
  }
  if (content.length === 0) throw new ParseError({ file, detail: 'the file is empty: no readings' });

  if (startsWith(content, UTF16BE_BOM)) {
    throw new ParseError({
      file,
      detail:
        'the file is UTF-16 big-endian text: expected utf-8, latin1 or utf-16le; export it again as UTF-8',
    });
  }
  if (encoding === 'utf-16le') return { text: decodeUtf16le(content, file), warnings: [] };

  if (startsWith(content, UTF16LE_BOM) || (content.length >= 4 && content[1] === 0 && content[3] === 0)) {
    throw new ParseError({
      file,
      detail: `the file looks like UTF-16 text but the profile says ${encoding}; set the profile's encoding to utf-16le`,
    });
  }
  const nul = content.indexOf(0);
  if (nul !== -1) {
    throw new ParseError({
      file,
      line: lineOfByte(content, nul),
      detail: 'the file contains binary data (NUL bytes): expected a text export (CSV)',
    });
  }
  if (encoding === 'latin1') {
    if (startsWith(content, UTF8_BOM)) {
      throw new ParseError({
        file,
        detail:
          'the file starts with a UTF-8 byte-order mark but the profile says latin1; set the encoding to utf-8',
      });
    }
    const text = content.toString('latin1');
    const mojibake = UTF8_READ_AS_LATIN1.exec(text);
    const warnings = mojibake
      ? [
          `line ${lineOfIndex(text, mojibake.index)} reads ${showCell(mojibake[0])}: the file may be UTF-8 although the profile says latin1`,
        ]
      : [];
    return { text, warnings };
  }
  const body = startsWith(content, UTF8_BOM) ? content.subarray(3) : content;
  try {
    return { text: new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(body), warnings: [] };
  } catch {
    const lossy = body.toString('utf8');
    const bad = lossy.indexOf('\ufffd');
    throw new ParseError({
      file,
      line: bad === -1 ? undefined : lineOfIndex(lossy, bad),
      detail:
        'the bytes are not valid UTF-8: expected UTF-8 text as the profile says ' +
        '(if the export comes from an older program, its encoding may be latin1)',
    });
  }
}

function decodeUtf16le(content: Buffer, file: string): string {
  const hasBom = startsWith(content, UTF16LE_BOM);
  if (startsWith(content, UTF8_BOM)) {
    throw new ParseError({
      file,
      detail:
        'the file starts with a UTF-8 byte-order mark but the profile says utf-16le; set the encoding to utf-8',
    });
  }
  if (content.length % 2 !== 0) {
    throw new ParseError({
      file,
      detail:
        'the file has an odd number of bytes: expected UTF-16LE text as the profile says (truncated, or another encoding)',
    });
  }
  const text = content.subarray(hasBom ? 2 : 0).toString('utf16le');
  const nul = text.indexOf('\u0000');
  if (nul !== -1) {
    throw new ParseError({
      file,
      line: lineOfIndex(text, nul),
      detail: 'the file contains binary data (NUL characters): expected a text export (CSV)',
    });
  }
  if (!hasBom && oddCharacterShare(text) > 0.3) {
    throw new ParseError({
      file,
      detail: 'the text does not read as UTF-16LE as the profile says; the file is probably utf-8 or latin1',
    });
  }
  return text;
}
