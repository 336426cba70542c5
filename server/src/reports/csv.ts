import { roundSignificant } from '../analysis/number-format';

/** A cell: text, a number, or empty (null/undefined). */
export type CsvCell = string | number | boolean | null | undefined;

/**
 * Characters that make a spreadsheet read a cell as a formula (or, for tab and carriage return, let
 * one through after the program trims it). A text cell starting with one gets a leading apostrophe.
 */
const FORMULA_START = /^[=+\-@\t\r]/;

/** Neutralise a text cell a spreadsheet would otherwise run as a formula: `=1+1` → `'=1+1`. */
export function escapeFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/**
 * One CSV field. Numbers are written as numbers (a negative number stays `-0.002`: a plain number is
 * no formula). Every text field is escaped against formulas and then quoted, doubling its quotes.
 */
export function csvField(value: CsvCell): string {
  if (value === null || value === undefined) return '';
  // Twelve significant digits: far beyond any measurement, and free of binary noise (0.1 + 0.2 → 0.3).
  if (typeof value === 'number') return Number.isFinite(value) ? String(roundSignificant(value, 12)) : '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  return `"${escapeFormula(value).replace(/"/g, '""')}"`;
}

/** RFC 4180 CSV: CRLF line ends, every text field quoted, with a byte-order mark so spreadsheets read UTF-8. */
export function toCsv(rows: readonly (readonly CsvCell[])[]): string {
  return `\uFEFF${rows.map((row) => row.map(csvField).join(',')).join('\r\n')}\r\n`;
}
