import { HttpErrorResponse } from '@angular/common/http';
import type { SampleDefinition } from '@equilight/analysis';
import {
  MANIFEST_COLUMNS,
  type ManifestMismatch,
  type ManifestProblem,
  manifestMismatchSchema,
  manifestProblemSchema,
} from '@equilight/contracts';
import { comparePositions } from '../shared/plate-grid/plate-geometry';

export { MANIFEST_COLUMNS };

export type { SampleDefinition };

export type ManifestColumn = (typeof MANIFEST_COLUMNS)[number];
export type ManifestRow = Record<ManifestColumn, string>;

/** The unit of each numeric column, shown beside its name. */
export const COLUMN_UNITS: Partial<Record<ManifestColumn, string>> = {
  concentration_M: 'mol/L',
  dilution_factor: '×',
  stock_a_M: 'mol/L',
  volume_a_mL: 'mL',
  stock_b_M: 'mol/L',
  volume_b_mL: 'mL',
  total_volume_mL: 'mL',
};

export type {
  ManifestCheck,
  ManifestDto as Manifest,
  ManifestMismatch,
  ManifestProblem,
  ManifestSource,
  ManifestSummaryDto as ManifestSummary,
  ManifestVersionInfo,
} from '@equilight/contracts';

/** What a refused save says: the code and the problems and mismatches the server listed. */
export function manifestRefusal(
  err: unknown,
): { code: string; problems: ManifestProblem[]; mismatches: ManifestMismatch[] } | null {
  if (!(err instanceof HttpErrorResponse)) return null;
  const body = err.error as { error?: { code?: unknown; details?: unknown } } | null;
  const code = body?.error?.code;
  if (typeof code !== 'string') return null;
  const details = (body?.error?.details ?? {}) as { problems?: unknown; mismatches?: unknown };
  return {
    code,
    problems: Array.isArray(details.problems)
      ? details.problems.filter((p) => manifestProblemSchema.safeParse(p).success)
      : [],
    mismatches: Array.isArray(details.mismatches)
      ? details.mismatches.filter((m) => manifestMismatchSchema.safeParse(m).success)
      : [],
  };
}

export function emptyRow(): ManifestRow {
  return Object.fromEntries(MANIFEST_COLUMNS.map((c) => [c, ''])) as ManifestRow;
}

const text = (v: number | string | undefined) => (v === undefined ? '' : String(v));

/** A saved sample back into the form's row, so a manifest can be edited in the table. */
export function sampleToRow(s: SampleDefinition): ManifestRow {
  return {
    position: s.position,
    sample_id: s.sampleId,
    role: s.role,
    concentration_M: text(s.concentrationM),
    dilution_factor: text(s.dilutionFactor),
    stock_a_M: text(s.stockAM),
    volume_a_mL: text(s.volumeAMl),
    stock_b_M: text(s.stockBM),
    volume_b_mL: text(s.volumeBMl),
    total_volume_mL: text(s.totalVolumeMl),
    replicate_group: s.replicateGroup ?? '',
  };
}

/** Problems in file order: by row, then by the column's place in the file. */
export function sortProblems(problems: readonly ManifestProblem[]): ManifestProblem[] {
  const place = (column: string) => {
    const i = (MANIFEST_COLUMNS as readonly string[]).indexOf(column);
    return i < 0 ? MANIFEST_COLUMNS.length : i;
  };
  return [...problems].sort(
    (a, b) => a.row - b.row || place(a.column) - place(b.column) || a.column.localeCompare(b.column),
  );
}

export function sortMismatches(mismatches: readonly ManifestMismatch[]): ManifestMismatch[] {
  return [...mismatches].sort((a, b) => comparePositions(a.position, b.position));
}

/** A blank manifest for people to fill in: the header and one invented example row per role. */
export function templateCsv(): string {
  const examples: Partial<ManifestRow>[] = [
    { position: 'A1', sample_id: 'BLANK-01', role: 'blank', replicate_group: 'BL' },
    {
      position: 'B1',
      sample_id: 'STD-050',
      role: 'standard',
      concentration_M: '0.00005',
      replicate_group: 'S1',
    },
    { position: 'C1', sample_id: 'UNK-07', role: 'unknown', dilution_factor: '2', replicate_group: 'U7' },
    {
      position: 'D1',
      sample_id: 'MIX-03',
      role: 'mixture',
      stock_a_M: '0.002',
      volume_a_mL: '1.5',
      stock_b_M: '0.002',
      volume_b_mL: '2.5',
      total_volume_mL: '10',
    },
    { position: 'E1', sample_id: 'CHECK-01', role: 'control', concentration_M: '0.00002' },
  ];
  const lines = [
    MANIFEST_COLUMNS.join(','),
    ...examples.map((row) => MANIFEST_COLUMNS.map((c) => row[c] ?? '').join(',')),
  ];
  return `${lines.join('\r\n')}\r\n`;
}
