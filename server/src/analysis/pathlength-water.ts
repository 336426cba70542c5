import { AnalysisError } from './errors';

/** Default water k-factor: A(977 nm) − A(900 nm) of water over 1 cm (≈ 0.18 per cm, room temperature). */
export const WATER_K_FACTOR_PER_CM = 0.18;

/**
 * Path length from the near-infrared water peak: l = (A₉₇₇ − A₉₀₀)_well / k, where k is the same
 * difference for water over 1 cm (about 0.18; it rises about 0.0008 per °C). Subtract an empty-plate
 * reading at both wavelengths first when the plate material absorbs there.
 *
 * Units: absorbances dimensionless, k per cm, result cm.
 * Reference: Lampinen J. et al. (2012) "Microplate based pathlength correction method for photometric
 * DNA quantification assay" (application note); k ≈ 0.172 at 975 nm/25 °C tabulated in the fpcountr
 * R package (Csibra & Stan, Nat. Commun. 13, 6600, 2022).
 *
 * @param a977 absorbance of the well near 977 nm (water peak)
 * @param a900 absorbance of the same well near 900 nm (baseline)
 * @param kFactorPerCm water k-factor, default 0.18
 * @example
 * pathLengthFromWaterPeak(0.105, 0.015); // 0.5 cm
 */
export function pathLengthFromWaterPeak(
  a977: number,
  a900: number,
  kFactorPerCm = WATER_K_FACTOR_PER_CM,
): number {
  if (!(kFactorPerCm > 0)) throw new AnalysisError('invalid-input', 'k-factor must be positive');
  const diff = a977 - a900;
  if (!(diff > 0))
    throw new AnalysisError('invalid-input', 'A(977) must exceed A(900) for a water-filled well');
  return diff / kFactorPerCm;
}
