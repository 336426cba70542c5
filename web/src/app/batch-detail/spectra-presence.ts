import type { Reading } from '@equilight/analysis';

/** A batch shows the Spectra section when a position was read at this many wavelengths or more. */
export const MIN_SPECTRUM_WAVELENGTHS = 10;

/**
 * Does any position carry a spectrum (≥ {@link MIN_SPECTRUM_WAVELENGTHS} distinct wavelengths)? Kept apart
 * from the section's model so the page can ask without loading it.
 */
export function hasSpectra(readings: readonly Reading[]): boolean {
  const byPosition = new Map<string, Set<number>>();
  for (const r of readings) {
    const set = byPosition.get(r.position) ?? new Set<number>();
    set.add(Math.round(r.wavelengthNm * 1000));
    if (set.size >= MIN_SPECTRUM_WAVELENGTHS) return true;
    byPosition.set(r.position, set);
  }
  return false;
}
