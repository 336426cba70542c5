import { Pipe, type PipeTransform } from '@angular/core';

const UNITS = ['kB', 'MB', 'GB', 'TB'];

/** A byte count for people: "812 B", "12.4 kB", "3.07 MB" (decimal units, 1 kB = 1000 B). */
export function formatFileSize(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return '—';
  if (bytes < 1000) return `${bytes} B`;
  let value = bytes;
  let unit = -1;
  while (value >= 1000 && unit < UNITS.length - 1) {
    value /= 1000;
    unit++;
  }
  const digits = value < 10 ? 2 : value < 100 ? 1 : 0;
  // Rounding can reach the next unit (999.96 kB → "1000 kB"); step up instead.
  if (Number(value.toFixed(digits)) >= 1000 && unit < UNITS.length - 1)
    return `${(value / 1000).toFixed(2)} ${UNITS[unit + 1]}`;
  return `${value.toFixed(digits)} ${UNITS[unit]}`;
}

@Pipe({ name: 'fileSize' })
export class FileSizePipe implements PipeTransform {
  transform(bytes: number): string {
    return formatFileSize(bytes);
  }
}
