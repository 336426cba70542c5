import type { Reading } from '../analysis/types';
import { ParseError } from './parse-error';
import type { FileFormat } from './parse-rules';

/** Run-level facts found in a file. */
export interface RunMetadata {
  runId?: string;
  /** Every wavelength read, in the order first met. */
  wavelengthsNm: number[];
  temperatureC?: number;
  readTime?: string;
  /** Header keys the parser does not use, kept for traceability. */
  extra: Record<string, string>;
}

export interface ParsedRun {
  format: FileFormat;
  metadata: RunMetadata;
  readings: Reading[];
  /** Things a person may want to know that do not stop the file, e.g. ignored columns. */
  warnings: string[];
}

/** Collects the readings of one file and refuses a second reading of the same well. */
export class ReadingSet {
  readonly readings: Reading[] = [];
  private readonly lineOf = new Map<string, number>();

  constructor(private readonly file: string) {}

  add(reading: Reading, line: number, column?: string | number): void {
    const key = `${reading.position}|${reading.wavelengthNm}|${reading.replicate ?? ''}`;
    const earlier = this.lineOf.get(key);
    if (earlier !== undefined) {
      const replicate = reading.replicate === undefined ? '' : `, replicate ${reading.replicate}`;
      throw new ParseError({
        file: this.file,
        line,
        column,
        detail:
          `duplicate reading for ${reading.position} at ${reading.wavelengthNm} nm${replicate} ` +
          `(first on line ${earlier}): expected one reading per position, wavelength and replicate`,
      });
    }
    this.lineOf.set(key, line);
    this.readings.push(reading);
  }

  /** Wraps the readings up; a file without readings is an error, never an empty run. */
  finish(format: FileFormat, metadata: Omit<RunMetadata, 'wavelengthsNm'>, warnings: string[]): ParsedRun {
    if (this.readings.length === 0) {
      throw new ParseError({ file: this.file, detail: 'no readings: the file has no data rows' });
    }
    const wavelengthsNm = [...new Set(this.readings.map((r) => r.wavelengthNm))];
    const saturated = this.readings.filter((r) => r.flag === 'saturated').length;
    const missing = this.readings.filter((r) => r.flag === 'missing').length;
    const notes = [...warnings];
    if (saturated > 0) notes.push(`${saturated} saturated reading(s) kept without absorbance`);
    if (missing > 0) notes.push(`${missing} empty cell(s) kept as missing readings`);
    return { format, metadata: { ...metadata, wavelengthsNm }, readings: this.readings, warnings: notes };
  }
}

/** The one value every reading shares, or undefined when they differ or none has it. */
export function sharedValue<T>(values: readonly (T | undefined)[]): T | undefined {
  const present = values.filter((v): v is T => v !== undefined);
  if (present.length === 0 || present.length !== values.length) return undefined;
  return present.every((v) => v === present[0]) ? present[0] : undefined;
}
