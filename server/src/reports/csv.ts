import { roundSignificant } from '../analysis/number-format';
import {
  type BatchReport,
  type ReportColumn,
  type ReportFormat,
  type ReportTable,
  type ReportValue,
  shownIn,
} from './report-model';

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

/** The columns and cells of a table a format shows. */
function visible(
  table: ReportTable,
  format: ReportFormat,
): { columns: ReportColumn[]; rows: ReportValue[][] } {
  const keep = table.columns.map((c, i) => ({ c, i })).filter(({ c }) => shownIn(c, format));
  return {
    columns: keep.map(({ c }) => c),
    rows: table.rows.map((row) => keep.map(({ i }) => row[i]?.value ?? null)),
  };
}

/** One table of the report model as header + rows of values (CSV and XLSX). */
export function tableValues(table: ReportTable, format: ReportFormat): ReportValue[][] {
  const { columns, rows } = visible(table, format);
  return [columns.map((c) => c.key), ...rows];
}

/** One table as CSV: a header of column keys and a line per row. */
export function tableToCsv(table: ReportTable): string {
  return toCsv(tableValues(table, 'csv'));
}

/**
 * The batch report as one CSV file. It opens with the batch's details as comment lines, `# key,value`
 * (a reader that knows `#` comments skips them; any other reads a two-field line), then an empty line;
 * then each table: an empty line, its title alone on a line, a header line of column keys, its rows.
 * A section's notes follow its tables as one-field lines under the title "<section> notes".
 */
export function reportToCsv(report: BatchReport): string {
  const lines: string[] = ['# Equilight batch results'];
  for (const section of report.sections)
    for (const d of section.details) if (shownIn(d, 'csv')) lines.push(`# ${d.key},${csvField(d.value)}`);
  const rows: CsvCell[][] = [];
  for (const section of report.sections) {
    if (!shownIn(section, 'csv')) continue;
    for (const table of section.tables) {
      if (!shownIn(table, 'csv')) continue;
      rows.push([], [table.title], ...tableValues(table, 'csv'));
    }
    const notes = section.notes.filter((n) => shownIn(n, 'csv'));
    if (notes.length) rows.push([], [`${section.title} notes`], ...notes.map((n) => [n.text]));
  }
  return `\uFEFF${[...lines, ...rows.map((row) => row.map(csvField).join(','))].join('\r\n')}\r\n`;
}
