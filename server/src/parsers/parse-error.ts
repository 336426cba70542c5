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
  /** What it found instead (shown quoted and shortened). */
  found?: string;
  /** Free text used instead of "expected …, found …". */
  detail?: string;
}

const MAX_SHOWN_CHARS = 40;

/** Quotes a cell for a message: control characters escaped, long text shortened. */
export function showCell(text: string): string {
  const escaped = Array.from(text, (c) => {
    const code = c.charCodeAt(0);
    return code < 0x20 || code === 0x7f ? `\\x${code.toString(16).padStart(2, '0')}` : c;
  }).join('');
  const shown = escaped.length > MAX_SHOWN_CHARS ? `${escaped.slice(0, MAX_SHOWN_CHARS)}…` : escaped;
  return `"${shown}"`;
}

function formatMessage(d: ParseErrorDetails): string {
  let where = d.file;
  if (d.line !== undefined) where += ` line ${d.line}`;
  if (d.column !== undefined) {
    where += `${d.line !== undefined ? ',' : ''} column ${typeof d.column === 'string' ? `"${d.column}"` : d.column}`;
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

  constructor(details: ParseErrorDetails) {
    super(formatMessage(details));
    this.name = 'ParseError';
    this.file = details.file;
    this.line = details.line;
    this.column = details.column;
    this.expected = details.expected;
  }
}
