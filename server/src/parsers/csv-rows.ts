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
 * Every record of a delimited text that has a non-empty cell, cells trimmed, with the line it starts on.
 * Row lengths are checked by the format parsers, which know what a row should hold. A text with quotes
 * goes through csv-parse (its synchronous API: the text is in memory already, and the stream API costs a
 * third more for the same records); one without is split at line ends and delimiters, to the same rows.
 */
export async function readCsvRows(text: string, options: CsvReadOptions): Promise<CsvRow[]> {
  // One kind of line end keeps the line count exact (blank CRLF lines can count twice in csv-parse).
  const normalised = text.replace(/\r\n?/g, '\n');
  return splitUnquoted(normalised, options) ?? parseQuoted(normalised, options);
}

/**
 * The records of a text without a quote character, where delimited text is nothing more than lines split
 * at the delimiter: the same rows csv-parse gives (checked against it in csv-rows.spec.ts) without its
 * per-record cost. csv-parse builds an error object, stack and copied record included, for every record
 * whose cell count differs from the first one's, even when told to accept it — in an export whose header
 * lines are shorter than its rows, that is every row, and half the time of storing a plate. Null when
 * the text has quotes or a line too long to be a record: csv-parse reads those.
 */
function splitUnquoted(text: string, options: CsvReadOptions): CsvRow[] | null {
  if (text.includes('"')) return null;
  const lines = text.split('\n');
  const rows: CsvRow[] = [];
  for (let i = options.skipLines; i < lines.length; i++) {
    const line = lines[i];
    if (line.length > MAX_RECORD_CHARS) return null;
    if (line === '') continue;
    const cells = line.split(options.delimiter).map((c) => c.trim());
    if (cells.every((c) => c === '')) continue;
    rows.push({ line: i + 1, cells });
  }
  return rows;
}

/** Reads a text with quotes (or overlong lines) with csv-parse. */
function parseQuoted(text: string, options: CsvReadOptions): CsvRow[] {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, {
      delimiter: options.delimiter,
      from_line: options.skipLines + 1,
      relax_column_count: true,
      // A quote inside an unquoted cell is kept as text, so the cell check names it.
      relax_quotes: true,
      skip_empty_lines: true,
      info: true,
      max_record_size: MAX_RECORD_CHARS,
    }) as unknown as { record: string[]; info: { lines: number } }[];
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
