import { CsvError, parse } from 'csv-parse/sync';
import { ParseError } from './parse-error';
import type { Delimiter } from './parse-rules';

/** One non-blank record of a delimited file, cells trimmed. */
export interface CsvRow {
  /** 1-based physical line where the record starts. */
  line: number;
  cells: string[];
}

export interface CsvReadOptions {
  file: string;
  delimiter: Delimiter;
  skipLines: number;
}

const SNIFF_LINES = 20;
const SNIFF_CHARS = 256 * 1024;
/** Far above any real export line (a 384-position spectrum row is about 5 kB). */
const MAX_RECORD_CHARS = 64 * 1024;
const QUOTED = /"(?:[^"]|"")*"/g;

/**
 * Picks the delimiter found on the most of the first lines (quoted text ignored).
 * Ties go to the one with more cells per line, so `0,5;0,7` is read as `;`.
 */
export function detectDelimiter(
  text: string,
  skipLines: number,
  candidates: readonly Delimiter[],
): Delimiter {
  const lines = text
    .slice(0, SNIFF_CHARS)
    .split(/\r?\n|\r/, skipLines + SNIFF_LINES * 4)
    .slice(skipLines)
    .filter((l) => l.trim() !== '')
    .slice(0, SNIFF_LINES)
    .map((l) => l.replace(QUOTED, ''));
  let best = candidates[0];
  let bestScore = -1;
  for (const d of candidates) {
    const counts = lines.map((l) => l.split(d).length - 1);
    const score = counts.filter((c) => c > 0).length * 1e6 + counts.reduce((a, b) => a + b, 0);
    if (score > bestScore) {
      best = d;
      bestScore = score;
    }
  }
  return best;
}

function csvErrorDetail(code: string): string {
  switch (code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return 'a quoted cell is never closed: expected a closing quote (the file may be truncated)';
    case 'CSV_INVALID_CLOSING_QUOTE':
    case 'INVALID_OPENING_QUOTE':
      return 'a stray quote inside a cell: expected quotes only around whole cells';
    case 'CSV_MAX_RECORD_SIZE':
      return 'a record is too long: expected lines of a text export';
    default:
      return `the file is not valid delimited text (${code})`;
  }
}

/**
 * Reads the text with csv-parse and returns every record that has a non-empty cell, with the line it
 * starts on. Row lengths are checked by the format parsers, which know what a row should hold.
 * The synchronous parser: the text is in memory already, and csv-parse's stream API costs a third more
 * for the same records (a 384-well plate: ~1 ms).
 */
export async function readCsvRows(text: string, options: CsvReadOptions): Promise<CsvRow[]> {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(
      // One kind of line end keeps csv-parse's line count exact (blank CRLF lines can count twice).
      text.replace(/\r\n?/g, '\n'),
      {
        delimiter: options.delimiter,
        from_line: options.skipLines + 1,
        relax_column_count: true,
        // A quote inside an unquoted cell is kept as text, so the cell check names it.
        relax_quotes: true,
        skip_empty_lines: true,
        info: true,
        max_record_size: MAX_RECORD_CHARS,
      },
    ) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (err) {
    if (err instanceof CsvError) {
      throw new ParseError({
        file: options.file,
        line: typeof err.lines === 'number' ? err.lines : undefined,
        detail: csvErrorDetail(err.code),
      });
    }
    throw err;
  }
  const rows: CsvRow[] = [];
  for (const item of records) {
    const cells = item.record.map((c) => c.trim());
    if (cells.every((c) => c === '')) continue;
    // info.lines is the line a record ends on; quoted line breaks move its start up.
    let breaksInside = 0;
    for (const c of item.record) if (c.includes('\n')) breaksInside += c.split('\n').length - 1;
    rows.push({ line: item.info.lines - breaksInside, cells });
  }
  return rows;
}
