/** Where a problem sits in an instrument file and what the parser wanted there. */
export interface ParseErrorDetails {
  /** Display name of the file: used in the message only, never as a path. */
  file: string;
  /** 1-based physical line in the file. */
  line?: number;
  /** Column name (long tables, spectra) or plate column number (grids). */
  column?: string | number;
  /** What the parser expected, e.g. "a number". */
  expected?: string;
  /** What it found instead: file content, shown only as a short excerpt (see `excerpt`). */
  found?: string;
  /** Free text used instead of "expected …, found …". File content only through `showCell`/`excerpt`. */
  detail?: string;
}

/** The most characters of file content any message quotes: enough to find the cell, too few to leak a file. */
export const MAX_EXCERPT_CHARS = 40;

// Control characters (C0, DEL, C1), line and paragraph separators, and bidirectional overrides:
// none is printable, and some change how the rest of a message looks.
// eslint-disable-next-line no-control-regex
const UNPRINTABLE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069\ufeff]/g;

/**
 * The one place where file content enters a message (parse errors, warnings): unprintable characters
 * removed, at most MAX_EXCERPT_CHARS characters, then "…".
 */
export function excerpt(text: string): string {
  const printable = Array.from(text.replace(UNPRINTABLE, ''));
  return printable.length > MAX_EXCERPT_CHARS
    ? `${printable.slice(0, MAX_EXCERPT_CHARS).join('')}…`
    : printable.join('');
}

/** Quotes file content for a message, as a short excerpt. */
export function showCell(text: string): string {
  return `"${excerpt(text)}"`;
}

function formatMessage(d: ParseErrorDetails): string {
  let where = d.file;
  if (d.line !== undefined) where += ` line ${d.line}`;
  if (d.column !== undefined) {
    where += `${d.line !== undefined ? ',' : ''} column ${typeof d.column === 'string' ? showCell(d.column) : d.column}`;
  }
  let what = d.detail ?? '';
  if (d.expected !== undefined) {
    what = `expected ${d.expected}${d.found !== undefined ? `, found ${showCell(d.found)}` : ''}${what ? ` (${what})` : ''}`;
  }
  return `${where}: ${what}`;
}

/**
 * A file that cannot be read into readings. The message names the file, the line and
 * the column and says what was expected, so that a person can fix the file or the profile.
 */
export class ParseError extends Error {
  readonly file: string;
  readonly line?: number;
  readonly column?: string | number;
  readonly expected?: string;
  /** What the error was made from: enough to make the same error again on another thread. */
  readonly details: ParseErrorDetails;

  constructor(details: ParseErrorDetails) {
    super(formatMessage(details));
    this.name = 'ParseError';
    this.details = { ...details };
    this.file = details.file;
    this.line = details.line;
    this.column = details.column;
    this.expected = details.expected;
  }
}
