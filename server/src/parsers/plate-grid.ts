import type { Reading } from '../analysis/types';
import { CellReader } from './cell-values';
import type { CsvRow } from './csv-rows';
import { ParseError } from './parse-error';
import type { ParseRules } from './parse-rules';
import { plateSize, rowLetter } from './position';
import { ReadingSet, type ParsedRun, type RunMetadata } from './reading-set';

const GRID_WIDTHS: Record<number, number> = { 12: 8, 24: 16 };
const ROW_LETTER = /^[A-Za-z]$/;

function trimTrailingEmpty(cells: string[]): string[] {
  let end = cells.length;
  while (end > 0 && cells[end - 1] === '') end--;
  return cells.slice(0, end);
}

/** A row whose first cell is empty and whose other cells are whole numbers starts a grid. */
function looksLikeGridHeader(cells: string[]): boolean {
  return cells[0] === '' && cells.slice(1).some((c) => /^\d+$/.test(c));
}

/**
 * Optional `key,value` lines, then one grid per wavelength: a row of column numbers
 * (1…12 or 1…24) and one row per plate row letter. Each grid takes the wavelength of the
 * `wavelength_nm` line before it, or the profile's default wavelength.
 */
export function parsePlateGrid(rows: CsvRow[], file: string, rules: ParseRules): ParsedRun {
  const size = plateSize(rules.plateFormat);
  if (size === undefined) {
    throw new ParseError({
      file: 'parsing rules',
      detail: 'plate grids need a 96- or 384-well plate format, not cuvette',
    });
  }
  const cells = new CellReader(file, rules.decimalMark);
  const set = new ReadingSet(file);
  const metadata: Omit<RunMetadata, 'wavelengthsNm'> = { extra: {} };
  const keys = {
    wavelength: new Set(['wavelength_nm', rules.columns.wavelength.toLowerCase()]),
    temperature: new Set(['temperature_c', rules.columns.temperature.toLowerCase()]),
    readTime: new Set(['read_time', rules.columns.readTime.toLowerCase()]),
  };
  let pendingWavelength: number | undefined;
  let temperatureC: number | undefined;
  let readTime: string | undefined;
  const gridLineOfWavelength = new Map<number, number>();
  let grids = 0;
  const warnings: string[] = [];

  let i = 0;
  while (i < rows.length) {
    const row = rows[i];
    const c = trimTrailingEmpty(row.cells);
    if (!looksLikeGridHeader(c)) {
      const key = cells.checkText(c[0], row.line, 1).toLowerCase();
      const value = cells.checkText(c[1] ?? '', row.line, 2);
      if (c.length > 2) {
        const detail = ROW_LETTER.test(c[0]) ? 'a grid row with no grid header line before it' : undefined;
        throw cells.error(
          row.line,
          undefined,
          'a "key,value" line or a grid header (an empty cell, then 1…12)',
          c.join(' '),
          detail,
        );
      }
      if (key === '') warnings.push(`line ${row.line}: a value without a key was ignored`);
      else if (keys.wavelength.has(key)) pendingWavelength = cells.wavelengthNm(value, row.line, 2);
      else if (keys.temperature.has(key))
        temperatureC = metadata.temperatureC = cells.temperatureC(value, row.line, 2);
      else if (keys.readTime.has(key)) readTime = metadata.readTime = value;
      else if (key === 'run_id') metadata.runId = value;
      else metadata.extra[c[0]] = value;
      i++;
      continue;
    }

    const numbers = c.slice(1);
    const plateRows = GRID_WIDTHS[numbers.length];
    const consecutive = numbers.every((n, k) => n === String(k + 1));
    if (plateRows === undefined || !consecutive) {
      throw cells.error(row.line, undefined, 'a grid header of column numbers 1…12 or 1…24', c.join(' '));
    }
    if (numbers.length !== size.columns) {
      throw cells.error(
        row.line,
        undefined,
        `a grid of ${size.rows}×${size.columns} for a ${rules.plateFormat}-well profile`,
        `${numbers.length} columns`,
      );
    }
    const wavelengthNm = pendingWavelength ?? rules.defaultWavelengthNm;
    if (wavelengthNm === undefined) {
      throw cells.error(
        row.line,
        undefined,
        'a "wavelength_nm" line before the grid',
        undefined,
        'or a default wavelength in the instrument profile',
      );
    }
    const earlierGrid = gridLineOfWavelength.get(wavelengthNm);
    if (earlierGrid !== undefined) {
      throw cells.error(
        row.line,
        undefined,
        'a "wavelength_nm" line before each grid',
        undefined,
        `this grid would repeat ${wavelengthNm} nm, already read by the grid on line ${earlierGrid}`,
      );
    }
    gridLineOfWavelength.set(wavelengthNm, row.line);
    pendingWavelength = undefined;

    for (let r = 0; r < size.rows; r++) {
      const letter = rowLetter(r);
      const gridRow = rows[i + 1 + r];
      if (gridRow === undefined || !ROW_LETTER.test(gridRow.cells[0])) {
        throw cells.error(
          gridRow?.line ?? rows[rows.length - 1].line,
          1,
          `row ${letter} of the grid that starts on line ${row.line}`,
          gridRow === undefined ? 'the end of the file' : gridRow.cells.join(' '),
          `the grid has ${r} of ${size.rows} rows`,
        );
      }
      if (gridRow.cells[0].toUpperCase() !== letter) {
        throw cells.error(
          gridRow.line,
          1,
          `row ${letter}`,
          gridRow.cells[0],
          `rows must run A…${rowLetter(size.rows - 1)} in order`,
        );
      }
      const values = trimTrailingEmpty(gridRow.cells).slice(1);
      if (values.length > size.columns) {
        throw cells.error(
          gridRow.line,
          size.columns + 1,
          `${size.columns} values after the row letter`,
          `${values.length} values`,
        );
      }
      if (gridRow.cells.length - 1 < size.columns) {
        throw cells.error(
          gridRow.line,
          gridRow.cells.length,
          `${size.columns} values after the row letter`,
          `${gridRow.cells.length - 1} values`,
          'missing columns',
        );
      }
      for (let col = 1; col <= size.columns; col++) {
        const reading: Reading = {
          position: `${letter}${col}`,
          wavelengthNm,
          ...cells.absorbance(gridRow.cells[col], gridRow.line, col),
        };
        if (readTime !== undefined && readTime !== '') reading.readTime = readTime;
        if (temperatureC !== undefined) reading.temperatureC = temperatureC;
        set.add(reading, gridRow.line, col);
      }
    }
    grids++;
    i += 1 + size.rows;
  }
  if (grids === 0) {
    throw new ParseError({
      file,
      detail:
        'no readings: expected a grid header line (an empty cell, then the column numbers 1…12 or 1…24)',
    });
  }
  return set.finish('plate_grid', metadata, warnings);
}
