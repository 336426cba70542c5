import type { ReadingFlag } from '../analysis/types';
import { ParseError } from './parse-error';
import type { PlateFormat } from './parse-rules';
import { describePositions, isValidPosition, normalisePosition } from './position';

/** Absorbances outside this range are not a reading but a broken export. */
export const ABSORBANCE_RANGE = { min: -1, max: 10 } as const;
export const WAVELENGTH_RANGE_NM = { min: 100, max: 3300 } as const;
export const TEMPERATURE_RANGE_C = { min: -80, max: 200 } as const;

// Spreadsheet programs evaluate cells starting with these; a file carrying them is never trusted.
const FORMULA_START = /^(?:[=+@]|-[^0-9.,\s])/;
const SATURATION_MARKER = /^(?:over|overflow|ovrflw|ovfl|sat|saturated|\*+|>\s*[0-9.,]+)$/i;

export function isFormulaLike(text: string): boolean {
  return FORMULA_START.test(text.trim());
}

export function isSaturationMarker(text: string): boolean {
  return SATURATION_MARKER.test(text.trim());
}

/** Strict number syntax: optional minus, digits with the decimal mark, optional exponent. */
export function parseDecimal(text: string, decimalMark: '.' | ','): number | undefined {
  const t = text.trim();
  const pattern =
    decimalMark === '.'
      ? /^-?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/
      : /^-?(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?$/;
  if (!pattern.test(t)) return undefined;
  const value = Number(decimalMark === ',' ? t.replace(',', '.') : t);
  return Number.isFinite(value) ? value : undefined;
}

export interface AbsorbanceCell {
  absorbance: number | null;
  flag?: ReadingFlag;
}

/** Turns cells into values for one file, throwing ParseErrors that point at the cell. */
export class CellReader {
  constructor(
    readonly file: string,
    readonly decimalMark: '.' | ',',
  ) {}

  error(
    line: number,
    column: string | number | undefined,
    expected: string,
    found?: string,
    detail?: string,
  ) {
    return new ParseError({ file: this.file, line, column, expected, found, detail });
  }

  /** Rejects formula-like text in any cell, whatever its column. */
  checkText(text: string, line: number, column: string | number | undefined): string {
    if (isFormulaLike(text)) {
      throw this.error(
        line,
        column,
        'a plain value',
        text,
        'formula-like cells are refused and never evaluated',
      );
    }
    return text.trim();
  }

  number(text: string, line: number, column: string | number | undefined, what = 'a number'): number {
    this.checkText(text, line, column);
    const value = parseDecimal(text, this.decimalMark);
    if (value === undefined) {
      const hint = this.decimalHint(text);
      throw this.error(line, column, what, text, hint);
    }
    return value;
  }

  wavelengthNm(text: string, line: number, column: string | number | undefined): number {
    const what = `a wavelength in nm (${WAVELENGTH_RANGE_NM.min}–${WAVELENGTH_RANGE_NM.max})`;
    if (text.trim() === '') throw this.error(line, column, what, text, 'the cell is empty');
    const value = this.number(text, line, column, what);
    if (value < WAVELENGTH_RANGE_NM.min || value > WAVELENGTH_RANGE_NM.max)
      throw this.error(line, column, what, text);
    return value;
  }

  temperatureC(text: string, line: number, column: string | number | undefined): number {
    const what = `a temperature in °C (${TEMPERATURE_RANGE_C.min}–${TEMPERATURE_RANGE_C.max})`;
    const value = this.number(text, line, column, what);
    if (value < TEMPERATURE_RANGE_C.min || value > TEMPERATURE_RANGE_C.max)
      throw this.error(line, column, what, text);
    return value;
  }

  replicate(text: string, line: number, column: string | number | undefined): number {
    this.checkText(text, line, column);
    const t = text.trim();
    if (!/^\d{1,6}$/.test(t) || Number(t) < 1)
      throw this.error(line, column, 'a replicate number 1, 2, …', text);
    return Number(t);
  }

  /** A position valid in the plate format, normalised (`a01` → `A1`). */
  position(
    text: string,
    line: number,
    column: string | number | undefined,
    plateFormat: PlateFormat,
  ): string {
    this.checkText(text, line, column);
    const normal = normalisePosition(text);
    if (normal === undefined || !isValidPosition(normal, plateFormat)) {
      const kind = plateFormat === 'cuvette' ? 'in a cuvette sequence' : `on a ${plateFormat}-well plate`;
      throw this.error(
        line,
        column,
        describePositions(plateFormat),
        text,
        normal ? `no such position ${kind}` : undefined,
      );
    }
    return normal;
  }

  /** A number, a saturation marker (→ null, saturated) or an empty cell (→ null, missing). */
  absorbance(text: string, line: number, column: string | number | undefined): AbsorbanceCell {
    const t = text.trim();
    if (t === '') return { absorbance: null, flag: 'missing' };
    if (isSaturationMarker(t)) return { absorbance: null, flag: 'saturated' };
    const what = 'an absorbance (a number, a saturation marker such as OVER, or an empty cell)';
    const value = this.number(t, line, column, what);
    if (value < ABSORBANCE_RANGE.min || value > ABSORBANCE_RANGE.max) {
      throw this.error(
        line,
        column,
        `an absorbance from ${ABSORBANCE_RANGE.min} to ${ABSORBANCE_RANGE.max}`,
        t,
      );
    }
    return { absorbance: value };
  }

  private decimalHint(text: string): string | undefined {
    const other = this.decimalMark === '.' ? ',' : '.';
    if (parseDecimal(text, other) !== undefined) {
      return `the profile's decimal mark is "${this.decimalMark}"`;
    }
    return undefined;
  }
}
