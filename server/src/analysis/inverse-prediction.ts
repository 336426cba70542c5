import { CalibrationResult } from './calibration';
import { AnalysisError } from './errors';

/** A concentration read back from a calibration. */
export interface InversePrediction {
  /** Concentration in the original sample (after the dilution factor), mol/L. */
  concentrationM: number;
  /** Standard error of that concentration from the calibration, mol/L. */
  seM: number;
}

/**
 * Concentration from absorbance by inverse prediction on a calibration line:
 * c = (A − b)/S × D, with
 * SE = (s/|S|)·√(1/m + 1/n + (A − Ā)²/(S²·Sxx)) × D (intercept model) or
 * SE = (s/|S|)·√(1/m + A²/(S²·Σc²)) × D (through the origin),
 * where m is the number of replicate readings averaged into A.
 *
 * Units: absorbance dimensionless, concentrations mol/L, D dimensionless.
 * Reference: Miller J.N. & Miller J.C., Statistics and Chemometrics for Analytical Chemistry, 6th ed.,
 * §5.6 (standard error of an interpolated concentration); ISO 8466-1.
 *
 * @param calibration result of `calibrate`
 * @param absorbance blank-corrected absorbance (mean of m replicates)
 * @param replicates m ≥ 1, number of readings averaged into `absorbance`
 * @param dilutionFactor D ≥ 1 applied after reading back, default 1
 * @example
 * concentrationFromAbsorbance(cal, 0.35, 2, 10).concentrationM; // ≈ 7.4e-4 for ε·l = 4700
 */
export function concentrationFromAbsorbance(
  calibration: CalibrationResult,
  absorbance: number,
  replicates = 1,
  dilutionFactor = 1,
): InversePrediction {
  if (!(replicates >= 1)) throw new AnalysisError('invalid-input', 'replicates must be at least 1');
  if (!(dilutionFactor > 0)) throw new AnalysisError('invalid-input', 'dilution factor must be positive');
  const { slope, intercept, residualSd: s, n, sxx } = calibration;
  const c = ((absorbance - intercept) / slope) * dilutionFactor;
  const term =
    calibration.model === 'linear'
      ? 1 / replicates + 1 / n + (absorbance - calibration.absorbanceMean) ** 2 / (slope * slope * sxx)
      : 1 / replicates + (absorbance * absorbance) / (slope * slope * sxx);
  return { concentrationM: c, seM: (s / Math.abs(slope)) * Math.sqrt(term) * dilutionFactor };
}
