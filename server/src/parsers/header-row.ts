import { ParseError, showCell } from './parse-error';
import type { Delimiter } from './parse-rules';
import type { CsvRow } from './csv-rows';

const DELIMITER_NAMES: Record<Delimiter, string> = { ',': '","', ';': '";"', '\t': 'tab' };

/** A hint when a one-cell header holds another delimiter: the profile's delimiter is likely wrong. */
export function delimiterHint(header: CsvRow, delimiter: Delimiter): string {
  if (header.cells.length !== 1) return '';
  const other = (Object.keys(DELIMITER_NAMES) as Delimiter[]).find(
    (d) => d !== delimiter && header.cells[0].includes(d),
  );
  return other
    ? `; the file looks ${DELIMITER_NAMES[other]}-delimited but the profile says ${DELIMITER_NAMES[delimiter]}`
    : '';
}

/** Header cells by lower-cased name; a repeated name is an error. */
export function indexHeader(header: CsvRow, file: string): Map<string, number> {
  const index = new Map<string, number>();
  header.cells.forEach((cell, i) => {
    const key = cell.toLowerCase();
    if (key === '') return;
    if (index.has(key)) {
      throw new ParseError({
        file,
        line: header.line,
        column: cell,
        detail: 'the header names this column twice',
      });
    }
    index.set(key, i);
  });
  return index;
}

/** The header row as a short excerpt (it may be the first line of any file). */
export function describeHeader(header: CsvRow): string {
  return showCell(header.cells.join(', '));
}

/**
 * Rows must have as many cells as the header; extra cells are tolerated only when empty,
 * as spreadsheets often leave trailing delimiters.
 */
export function checkRowWidth(row: CsvRow, width: number, file: string): void {
  const extra = row.cells.slice(width);
  if (row.cells.length < width || extra.some((c) => c !== '')) {
    throw new ParseError({
      file,
      line: row.line,
      expected: `${width} cells like the header row`,
      found: `${row.cells.length} cells`,
      detail: 'ragged row',
    });
  }
}
