import type { SampleRole } from '@equilight/analysis';

export type { SampleRole };
export type { PlateFormat } from '@equilight/contracts';
export { PLATE_FORMAT_LABELS as FORMAT_LABELS } from '@equilight/contracts';
import type { PlateFormat } from '@equilight/contracts';

/** The role code (name, letter, pattern, colours) lives in the contracts: `shared/role-code`. */
export { ROLE_CODE, SAMPLE_ROLES } from '../role-code/role-style';

/** What one position holds, as far as the grid shows it. */
export interface PlateCell {
  role?: SampleRole;
  replicateGroup?: string;
  /** Extra text, e.g. the manifest's sample id. */
  label?: string;
}

export interface GridPoint {
  r: number;
  c: number;
}

export interface PlateGeometry {
  format: PlateFormat;
  rows: number;
  cols: number;
  rowLabels: string[];
  colLabels: string[];
  /** The position name at a row and column, or null past the end of a cuvette sequence. */
  positionAt(r: number, c: number): string | null;
}

const ROW_LETTERS = 'ABCDEFGHIJKLMNOP';
/** Cuvettes are drawn in rows of this many. */
export const CUVETTES_PER_ROW = 12;

export function plateGeometry(format: PlateFormat, cuvetteCount = 12): PlateGeometry {
  if (format === 'cuvette') {
    const count = Math.max(1, Math.min(999, Math.floor(cuvetteCount) || 1));
    const rows = Math.ceil(count / CUVETTES_PER_ROW);
    const cols = Math.min(count, CUVETTES_PER_ROW);
    return {
      format,
      rows,
      cols,
      rowLabels: Array.from({ length: rows }, (_, r) => {
        const first = r * CUVETTES_PER_ROW + 1;
        return `C${first}–C${Math.min(count, first + CUVETTES_PER_ROW - 1)}`;
      }),
      colLabels: Array.from({ length: cols }, (_, c) => `+${c}`),
      positionAt: (r, c) => {
        const n = r * CUVETTES_PER_ROW + c + 1;
        return n <= count && c < cols && r < rows && r >= 0 && c >= 0 ? `C${n}` : null;
      },
    };
  }
  const rows = format === '384' ? 16 : 8;
  const cols = format === '384' ? 24 : 12;
  return {
    format,
    rows,
    cols,
    rowLabels: ROW_LETTERS.slice(0, rows).split(''),
    colLabels: Array.from({ length: cols }, (_, c) => String(c + 1)),
    positionAt: (r, c) => (r >= 0 && r < rows && c >= 0 && c < cols ? `${ROW_LETTERS[r]}${c + 1}` : null),
  };
}

/** Every position of the plate, row by row. */
export function allPositions(geometry: PlateGeometry): string[] {
  const out: string[] = [];
  for (let r = 0; r < geometry.rows; r++)
    for (let c = 0; c < geometry.cols; c++) {
      const p = geometry.positionAt(r, c);
      if (p) out.push(p);
    }
  return out;
}

/** The positions in the rectangle spanned by two corners. */
export function positionsInRect(geometry: PlateGeometry, a: GridPoint, b: GridPoint): string[] {
  const out: string[] = [];
  for (let r = Math.min(a.r, b.r); r <= Math.max(a.r, b.r); r++)
    for (let c = Math.min(a.c, b.c); c <= Math.max(a.c, b.c); c++) {
      const p = geometry.positionAt(r, c);
      if (p) out.push(p);
    }
  return out;
}

/** A1, A2, …, A10, B1: letters first, then the number as a number. */
export function comparePositions(a: string, b: string): number {
  return a.localeCompare(b, 'en', { numeric: true });
}
