/** Detection and quantitation limits in concentration units. */
export interface DetectionLimits {
  /** LOD = 3.3·σ/S, in the x-units of the calibration (mol/L for a concentration calibration). */
  lod: number;
  /** LOQ = 10·σ/S, same units. */
  loq: number;
}

/**
 * ICH Q2(R1) detection limit and quantitation limit from the calibration line:
 * LOD = 3.3·σ/S and LOQ = 10·σ/S, with σ the residual SD of the regression (s_y/x, absorbance
 * units) and S the slope (absorbance per mol/L).
 *
 * Reference: ICH Q2(R1) "Validation of Analytical Procedures: Text and Methodology", Part II, DL/QL
 * based on the standard deviation of the response and the slope (kept in ICH Q2(R2), 2023).
 *
 * @param sigma residual SD of the calibration, absorbance units
 * @param slope calibration slope, absorbance per mol/L
 * @example
 * detectionLimits(0.0033, 4700); // { lod: 2.317e-6, loq: 7.02e-6 } (mol/L)
 */
export function detectionLimits(sigma: number, slope: number): DetectionLimits {
  const s = Math.abs(slope);
  return { lod: (3.3 * sigma) / s, loq: (10 * sigma) / s };
}
