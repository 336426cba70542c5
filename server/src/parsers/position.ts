import type { PlateFormat } from './parse-rules';

const POSITION_SYNTAX = /^([A-Za-z])0*(\d{1,4})$/;
const PLATE_SIZE = { '96': { rows: 8, columns: 12 }, '384': { rows: 16, columns: 24 } } as const;
const MAX_CUVETTES = 9999;

/** `a01` → `A1`; undefined when the text is not a letter followed by a number. */
export function normalisePosition(text: string): string | undefined {
  const m = POSITION_SYNTAX.exec(text.trim());
  if (!m) return undefined;
  return `${m[1].toUpperCase()}${Number(m[2])}`;
}

/** Rows and columns of a plate, or undefined for a cuvette sequence. */
export function plateSize(plateFormat: PlateFormat): { rows: number; columns: number } | undefined {
  return plateFormat === 'cuvette' ? undefined : PLATE_SIZE[plateFormat];
}

/** The row letter of a 0-based row index (0 → A). */
export function rowLetter(index: number): string {
  return String.fromCharCode(65 + index);
}

/**
 * True when the position exists in the plate format: 96 → A–H × 1–12, 384 → A–P × 1–24,
 * cuvette → C1, C2, …. Accepts unnormalised text such as `a01`.
 */
export function isValidPosition(position: string, plateFormat: PlateFormat): boolean {
  const normal = normalisePosition(position);
  if (normal === undefined) return false;
  const letter = normal.charCodeAt(0) - 65;
  const number = Number(normal.slice(1));
  if (number < 1) return false;
  const size = plateSize(plateFormat);
  if (size === undefined) return normal[0] === 'C' && number <= MAX_CUVETTES;
  return letter < size.rows && number <= size.columns;
}

/** What a position looks like in a plate format, for messages. */
export function describePositions(plateFormat: PlateFormat): string {
  if (plateFormat === 'cuvette') return 'a cuvette position C1, C2, …';
  return plateFormat === '96' ? 'a 96-well position A1…H12' : 'a 384-well position A1…P24';
}
