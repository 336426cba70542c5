import type { CalibrationResult, JobBatchResult, MixtureResult, PositionResult } from '../analysis';

/**
 * One batch report as data: what the CSV, the XLSX workbook and the PDF all write, built once from the
 * batch's analysis (`buildBatchReport`). A renderer chooses how to draw it, never what it says.
 */
export interface BatchReport {
  title: string;
  /** "Equilight · batch 7 · approved · generated 2026-12-02T06:30Z". */
  subtitle: string;
  /** The stoichiometry verdict and the batch's one K, when there are mixtures. */
  verdict: { text: string; kLine: string | null } | null;
  sections: ReportSection[];
  /** Page footer name. */
  footer: string;
}

/** Where a part of the report appears. Everything appears everywhere unless it says otherwise. */
export type ReportFormat = 'csv' | 'xlsx' | 'pdf';

/** One line of a key–value list: `key` names it in the CSV/XLSX, `label` for a person. */
export interface ReportDetail {
  key: string;
  label: string;
  /** As a person reads it. */
  text: string;
  /** As a spreadsheet takes it (a number stays a number). */
  value: ReportValue;
  in?: readonly ReportFormat[];
}

export type ReportValue = string | number | boolean | null;

/** A cell: the formatted text (PDF) and the value a spreadsheet takes (CSV, XLSX), rounded to its significance. */
export interface ReportCell {
  text: string;
  value: ReportValue;
}

export interface ReportColumn {
  /** Machine name: the CSV and XLSX header, e.g. `concentration_M`. */
  key: string;
  /** Header for a person, e.g. "c". */
  header: string;
  /** Unit of the column's values ("mol/L", "L·mol⁻¹"); empty when dimensionless or mixed. */
  unit?: string;
  align?: 'left' | 'right';
  /** Relative width on the page (points at full width; scaled to fit). */
  width: number;
  /** Formats that show the column (default: all). */
  in?: readonly ReportFormat[];
}

export interface ReportTable {
  /** Stable name: the CSV section title and the XLSX sheet name. */
  title: string;
  columns: ReportColumn[];
  rows: ReportCell[][];
  /** What the PDF says when there are no rows. */
  empty?: string;
  /** `quantities`: the PDF draws a one-row table as one line per column (quantity, value, unit). */
  pdfLayout?: 'rows' | 'quantities';
  /** Formats that show the table (default: all). */
  in?: readonly ReportFormat[];
}

/** Drawings: the data they need, drawn by the PDF only. */
export type ReportFigure =
  | {
      kind: 'layout-map';
      positions: PositionResult[];
      /** Role of every position of the layout. */
      roles: Map<string, string>;
    }
  | { kind: 'calibration'; calibration: CalibrationResult }
  | { kind: 'job'; job: JobBatchResult; mixtures: MixtureResult[] };

/** A paragraph; `emphasis` makes it bold, `muted` grey. */
export interface ReportNote {
  text: string;
  style?: 'plain' | 'emphasis' | 'muted';
  in?: readonly ReportFormat[];
}

/** One headed part of the report, drawn in this order: details, figures, tables, notes. */
export interface ReportSection {
  title: string;
  details: ReportDetail[];
  figures: ReportFigure[];
  tables: ReportTable[];
  notes: ReportNote[];
  in?: readonly ReportFormat[];
}

/** Whether a part with an `in` list appears in a format. */
export function shownIn(part: { in?: readonly ReportFormat[] }, format: ReportFormat): boolean {
  return !part.in || part.in.includes(format);
}
