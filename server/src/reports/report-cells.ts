import { DASH, formatNumber, guidanceFor, roundSignificant, significantDigits } from '../analysis';
import type { ReportCell, ReportColumn, ReportDetail, ReportFormat, ReportValue } from './report-model';

/** Building blocks of the report model: cells, columns, details and a row's own QC findings. */

export const SHEETS: readonly ReportFormat[] = ['csv', 'xlsx'];
export const PDF: readonly ReportFormat[] = ['pdf'];

export const missing = (v: number | null | undefined): v is null | undefined =>
  v === null || v === undefined || !Number.isFinite(v);

// Cells. A spreadsheet value is rounded to what it means, never the binary noise of the arithmetic.

export function text(value: string | null | undefined, empty = ''): ReportCell {
  return { text: value ?? empty, value: value ?? null };
}

/** A number to `digits` significant digits in both the text and the value. */
export function num(value: number | null | undefined, digits = 4, textDigits = 3): ReportCell {
  return missing(value)
    ? { text: DASH, value: null }
    : { text: formatNumber(value, textDigits), value: roundSignificant(value, digits) };
}

/** A measured value rounded to the second significant digit of its uncertainty (GUM §7.2.6). */
export function measured(value: number | null | undefined, se: number | null | undefined): ReportCell {
  if (missing(value)) return { text: DASH, value: null };
  const digits = missing(se) ? 4 : significantDigits(value, se);
  return { text: formatNumber(value, missing(se) ? 3 : digits), value: roundSignificant(value, digits) };
}

/** A fixed number of decimals (absorbance to the instruments' 0.0001, R² to 10⁻⁶, AIC to 0.001). */
export function decimals(value: number | null | undefined, places: number, textPlaces = places): ReportCell {
  return missing(value)
    ? { text: DASH, value: null }
    : { text: value.toFixed(textPlaces), value: Number(value.toFixed(places)) };
}

export function count(value: number): ReportCell {
  return { text: String(value), value };
}

export function fraction(value: number | null | undefined): ReportCell {
  return missing(value)
    ? { text: DASH, value: null }
    : { text: `${(value * 100).toFixed(1)} %`, value: roundSignificant(value, 4) };
}

/** A moment in a report's text: ISO 8601 in UTC to the minute ("2026-03-14T09:30Z"), as the API gives it. */
export const minute = (iso: string | null | undefined): string =>
  iso ? `${new Date(iso).toISOString().slice(0, 16)}Z` : DASH;

export function detail(
  key: string,
  label: string,
  textValue: string,
  value: ReportValue = textValue,
  formats?: readonly ReportFormat[],
): ReportDetail {
  return { key, label, text: textValue, value, ...(formats ? { in: formats } : {}) };
}

export const col = (
  key: string,
  header: string,
  width: number,
  more: Partial<Omit<ReportColumn, 'key' | 'header' | 'width'>> = {},
): ReportColumn => ({ key, header, width, ...more });
export const right = { align: 'right' as const };

/** The QC findings that concern one row (the rule lives in the analysis module, shared with the screens). */
export { ownFindings } from '../analysis';

/** Codes (spreadsheets) and plain words (PDF) of a row's findings, each code once. */
export function findingsCell(codes: readonly string[]): ReportCell {
  const unique = [...new Set(codes)];
  return { text: unique.map((c) => guidanceFor(c).title).join('; '), value: unique.join(' ') };
}

/** One report of a batch: every section the CSV, XLSX and PDF write, from its analysis. */
