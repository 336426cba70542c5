import type {
  AnalysisSettings,
  BatchResult,
  Reading,
  SpectralSettings,
  WaterPeakPathLengths,
} from '../analysis';

/**
 * What the server adds around `analyzeBatch` when it prepares a batch's analysis: per-well path lengths
 * from the water peak, and the whole-spectrum analysis of batches with spectra.
 */

/** A batch whose positions are read at this many wavelengths (or more) gets the whole-spectrum analysis. */
export const SPECTRAL_MIN_WAVELENGTHS = 10;

/** The settings with the wells' water-peak path lengths (a length the settings give already wins). */
export function withWellPathLengths(
  settings: AnalysisSettings,
  water: WaterPeakPathLengths | null,
): AnalysisSettings {
  if (!water || water.wells.length === 0) return settings;
  return {
    ...settings,
    pathLengthByPositionCm: { ...water.byPosition, ...(settings.pathLengthByPositionCm ?? {}) },
  };
}

/** The water-peak notes join the result's warnings (once). */
export function addWaterNotes(result: BatchResult, water: WaterPeakPathLengths | null): BatchResult {
  if (!water) return result;
  const notes = [...water.warnings];
  if (water.wells.length)
    notes.unshift(
      `path lengths of ${water.wells.length} well(s) from the water peak, (A${Math.round(water.peakNm)} − ` +
        `A${Math.round(water.baselineNm)})/${water.kFactorPerCm} cm⁻¹`,
    );
  return { ...result, warnings: [...result.warnings, ...notes.filter((n) => !result.warnings.includes(n))] };
}

/**
 * True when some position is read at SPECTRAL_MIN_WAVELENGTHS or more wavelengths (water-peak reads left
 * out): a count over the readings, so single-wavelength batches pay nothing more.
 */
export function hasSpectra(readings: readonly Reading[], water: WaterPeakPathLengths | null): boolean {
  const byPosition = new Map<string, Set<number>>();
  for (const r of spectralReadings(readings, water)) {
    let set = byPosition.get(r.position);
    if (!set) byPosition.set(r.position, (set = new Set()));
    set.add(r.wavelengthNm);
    if (set.size >= SPECTRAL_MIN_WAVELENGTHS) return true;
  }
  return false;
}

/** The readings the whole-spectrum analysis takes: without the water-peak reads of a plate. */
export function spectralReadings(
  readings: readonly Reading[],
  water: WaterPeakPathLengths | null,
): readonly Reading[] {
  if (!water) return readings;
  return readings.filter(
    (r) => Math.abs(r.wavelengthNm - water.peakNm) > 3 && Math.abs(r.wavelengthNm - water.baselineNm) > 3,
  );
}

/** The batch's analysis settings as the whole-spectrum analysis takes them (the shared fields). */
export function spectralSettingsOf(settings: AnalysisSettings): SpectralSettings {
  return {
    pathLengthCm: settings.pathLengthCm,
    pathLengthByPositionCm: settings.pathLengthByPositionCm,
    candidates: settings.candidates,
    exclusions: settings.exclusions,
    fitBaseline: settings.fitBaseline,
  };
}
