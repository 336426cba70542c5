// Test helper: reads the NIST StRD copies and chemistry references kept beside the repository.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

export const REFERENCE_DIR = resolve(__dirname, '../../../../../shared/reference');

export function readXy(name: string): { x: number[]; y: number[] } {
  const rows = readFileSync(resolve(REFERENCE_DIR, `${name}_xy.txt`), 'utf8')
    .split('\n')
    .map((l) => l.trim())
    .filter((l) => l && !l.startsWith('#'))
    .map((l) => l.split(/\s+/).map(Number));
  return { x: rows.map((r) => r[0]), y: rows.map((r) => r[1]) };
}

export function readJson<T = Record<string, unknown>>(file: string): T {
  return JSON.parse(readFileSync(resolve(REFERENCE_DIR, file), 'utf8')) as T;
}

/** Log relative error: the number of significant digits that agree. */
export function lre(actual: number, certified: number): number {
  if (actual === certified) return 16;
  return -Math.log10(Math.abs(actual - certified) / Math.abs(certified));
}
