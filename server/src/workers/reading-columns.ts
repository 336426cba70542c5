import type { Reading, ReadingFlag } from '../analysis/types';

/**
 * Readings as columns: typed arrays and small string tables. A million readings cross between threads
 * as a few memory copies instead of a million cloned objects (which would stall the receiving thread).
 */
export interface ReadingColumns {
  count: number;
  /** Distinct texts; index 0 of each `…Index` column means "none". */
  positions: string[];
  positionIndex: Uint32Array;
  flags: string[];
  flagIndex: Uint32Array;
  readTimes: string[];
  readTimeIndex: Uint32Array;
  wavelengthNm: Float64Array;
  /** NaN where the reading has no absorbance (null). */
  absorbance: Float64Array;
  /** NaN where absent. */
  temperatureC: Float64Array;
  /** 0 where absent (replicates count from 1). */
  replicate: Int32Array;
}

function textColumn(
  readings: readonly Reading[],
  pick: (r: Reading) => string | undefined,
): { table: string[]; index: Uint32Array } {
  const table = [''];
  const seen = new Map<string, number>();
  const index = new Uint32Array(readings.length);
  readings.forEach((r, i) => {
    const text = pick(r);
    if (text === undefined) return;
    let at = seen.get(text);
    if (at === undefined) {
      at = table.push(text) - 1;
      seen.set(text, at);
    }
    index[i] = at;
  });
  return { table, index };
}

export function toColumns(readings: readonly Reading[]): ReadingColumns {
  const n = readings.length;
  const positions = textColumn(readings, (r) => r.position);
  const flags = textColumn(readings, (r) => r.flag);
  const readTimes = textColumn(readings, (r) => r.readTime);
  const wavelengthNm = new Float64Array(n);
  const absorbance = new Float64Array(n);
  const temperatureC = new Float64Array(n);
  const replicate = new Int32Array(n);
  readings.forEach((r, i) => {
    wavelengthNm[i] = r.wavelengthNm;
    absorbance[i] = r.absorbance ?? NaN;
    temperatureC[i] = r.temperatureC ?? NaN;
    replicate[i] = r.replicate ?? 0;
  });
  return {
    count: n,
    positions: positions.table,
    positionIndex: positions.index,
    flags: flags.table,
    flagIndex: flags.index,
    readTimes: readTimes.table,
    readTimeIndex: readTimes.index,
    wavelengthNm,
    absorbance,
    temperatureC,
    replicate,
  };
}

/** Row `i` as the values of a `readings` row after `intake_file_id`, in table column order. */
export function rowValues(c: ReadingColumns, i: number): unknown[] {
  return [
    c.positions[c.positionIndex[i]!],
    c.wavelengthNm[i],
    Number.isNaN(c.absorbance[i]) ? null : c.absorbance[i],
    c.flagIndex[i] ? c.flags[c.flagIndex[i]!] : null,
    c.readTimeIndex[i] ? c.readTimes[c.readTimeIndex[i]!] : null,
    Number.isNaN(c.temperatureC[i]) ? null : c.temperatureC[i],
    c.replicate[i] ? c.replicate[i] : null,
  ];
}

/** The `readings` table columns that `rowValues` fills, after `intake_file_id`. */
export const READING_COLUMNS = [
  'position',
  'wavelength_nm',
  'absorbance',
  'flag',
  'read_time',
  'temperature_c',
  'replicate',
] as const;

export function fromColumns(c: ReadingColumns): Reading[] {
  const readings: Reading[] = new Array<Reading>(c.count);
  for (let i = 0; i < c.count; i++) {
    const r: Reading = {
      position: c.positions[c.positionIndex[i]!]!,
      wavelengthNm: c.wavelengthNm[i]!,
      absorbance: Number.isNaN(c.absorbance[i]) ? null : c.absorbance[i]!,
    };
    if (c.flagIndex[i]) r.flag = c.flags[c.flagIndex[i]!] as ReadingFlag;
    if (c.readTimeIndex[i]) r.readTime = c.readTimes[c.readTimeIndex[i]!];
    if (!Number.isNaN(c.temperatureC[i])) r.temperatureC = c.temperatureC[i];
    if (c.replicate[i]) r.replicate = c.replicate[i];
    readings[i] = r;
  }
  return readings;
}
