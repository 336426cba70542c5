import { detectionLimits } from './detection-limits';
import { AnalysisError } from './errors';
import { fitLinear, LinearFit } from './linear-regression';
import { mandelTest, MandelTestResult } from './mandel-test';

/** One standard as given to {@link calibrate}. */
export interface CalibrationStandard {
  /** Known concentration of the absorbing species, mol/L. */
  concentrationM: number;
  /** Blank-corrected absorbance (dimensionless, at the batch path length). */
  absorbance: number;
  position?: string;
  sampleId?: string;
}

export interface CalibrationOptions {
  /** Path length, cm (ε = slope / path length). Default 1. */
  pathLengthCm?: number;
  /** Fit A = S·c instead of A = S·c + b. Default false. */
  throughOrigin?: boolean;
  /** Absorbance above which a standard is flagged as outside the linear range. Default 1.0 (common practice). */
  linearRangeMaxAbsorbance?: number;
  /** |externally studentised residual| above which a standard is flagged as an outlier. Default 3 (common practice). */
  outlierStudentizedResidual?: number;
}

/** A standard after the fit, with its checks. */
export interface CalibrationPoint {
  position: string | null;
  sampleId: string | null;
  concentrationM: number;
  absorbance: number;
  predictedAbsorbance: number;
  residual: number;
  /** Externally studentised residual t_i = r_i·√((df−1)/(df−r_i²)), r_i = e_i/(s·√(1−h_i)); null when undefined. */
  studentizedResidual: number | null;
  aboveLinearRange: boolean;
  outlier: boolean;
}

/** Beer–Lambert calibration A = ε·l·c (+ intercept). */
export interface CalibrationResult {
  model: 'linear' | 'through-origin';
  n: number;
  df: number;
  /** Absorbance per mol/L. */
  slope: number;
  /** Absorbance; 0 through the origin. */
  intercept: number;
  slopeSe: number;
  interceptSe: number | null;
  /** s_y/x, absorbance. */
  residualSd: number;
  r2: number;
  /** Molar absorptivity ε = slope / l, L·mol⁻¹·cm⁻¹. */
  epsilonLPerMolCm: number;
  epsilonSe: number;
  pathLengthCm: number;
  /** ICH Q2 limits, mol/L. */
  lodM: number;
  loqM: number;
  /** Lowest non-zero standard concentration, mol/L (null when every standard is zero). */
  lowestStandardM: number | null;
  /** The LOD / LOQ lies below the lowest non-zero standard: extrapolated, not measured. */
  lodExtrapolated: boolean;
  loqExtrapolated: boolean;
  /** Mandel's fitting test (ISO 8466-1), quadratic vs straight line; null with fewer than 5 standards. */
  linearity: MandelTestResult | null;
  /** Mean concentration (mol/L) and absorbance of the standards, and Σ(x−x̄)² (Σx² through the origin). */
  concentrationMeanM: number;
  absorbanceMean: number;
  sxx: number;
  points: CalibrationPoint[];
}

/**
 * Beer–Lambert calibration by ordinary least squares: A = S·c + b (or A = S·c), ε = S/l,
 * LOD = 3.3·s_y/x/S, LOQ = 10·s_y/x/S, and a linear-range check per standard: absorbance above a
 * ceiling, or an externally studentised residual t_i = r_i·√((df−1)/(df−r_i²)) beyond a limit, with
 * r_i = e_i/(s·√(1−h_i)), h_i = 1/n + (c_i−c̄)²/Sxx (through the origin h_i = c_i²/Σc²). Linearity is
 * judged beside R² by Mandel's fitting test (ISO 8466-1); an LOD or LOQ below the lowest non-zero
 * standard is labelled extrapolated.
 *
 * Units: concentrations mol/L, absorbance dimensionless, path length cm, ε L·mol⁻¹·cm⁻¹.
 * Reference: Beer–Lambert law; ICH Q2(R1) for LOD/LOQ; Draper & Smith, Applied Regression Analysis,
 * §8.1 and Belsley, Kuh & Welsch, Regression Diagnostics (Wiley, 1980) for studentised residuals.
 *
 * @example
 * const cal = calibrate([
 *   { concentrationM: 0, absorbance: 0.001 }, { concentrationM: 5e-5, absorbance: 0.236 },
 *   { concentrationM: 1e-4, absorbance: 0.469 }, { concentrationM: 1.5e-4, absorbance: 0.706 },
 * ]);
 * cal.epsilonLPerMolCm; // ≈ 4.7e3
 */
export function calibrate(
  standards: readonly CalibrationStandard[],
  options: CalibrationOptions = {},
): CalibrationResult {
  const pathLengthCm = options.pathLengthCm ?? 1;
  const ceiling = options.linearRangeMaxAbsorbance ?? 1;
  const outlierLimit = options.outlierStudentizedResidual ?? 3;
  if (!(pathLengthCm > 0)) throw new AnalysisError('invalid-input', 'path length must be positive');
  const x = standards.map((s) => s.concentrationM);
  const y = standards.map((s) => s.absorbance);
  const fit: LinearFit = fitLinear(x, y, options.throughOrigin ?? false);
  const limits = detectionLimits(fit.residualSd, fit.slope);
  const nonZero = x.filter((c) => c > 0);
  const lowestStandardM = nonZero.length ? Math.min(...nonZero) : null;
  const points = standards.map((s, i): CalibrationPoint => {
    const leverage =
      fit.model === 'linear' ? 1 / fit.n + (x[i] - fit.xMean) ** 2 / fit.sxx : x[i] ** 2 / fit.sxx;
    const denom = fit.residualSd * Math.sqrt(1 - leverage);
    const internal = denom > 0 && leverage < 1 - 1e-12 ? fit.residuals[i] / denom : null;
    // Externally studentised (deleted) residual: unbounded, unlike the internal one (|r| ≤ √df).
    const studentized =
      internal !== null && fit.df > 1 && fit.df - internal * internal > 0
        ? internal * Math.sqrt((fit.df - 1) / (fit.df - internal * internal))
        : null;
    return {
      position: s.position ?? null,
      sampleId: s.sampleId ?? null,
      concentrationM: x[i],
      absorbance: y[i],
      predictedAbsorbance: y[i] - fit.residuals[i],
      residual: fit.residuals[i],
      studentizedResidual: studentized,
      aboveLinearRange: y[i] > ceiling,
      outlier: studentized !== null && Math.abs(studentized) > outlierLimit,
    };
  });
  return {
    model: fit.model,
    n: fit.n,
    df: fit.df,
    slope: fit.slope,
    intercept: fit.intercept,
    slopeSe: fit.slopeSe,
    interceptSe: fit.interceptSe,
    residualSd: fit.residualSd,
    r2: fit.r2,
    epsilonLPerMolCm: fit.slope / pathLengthCm,
    epsilonSe: fit.slopeSe / pathLengthCm,
    pathLengthCm,
    lodM: limits.lod,
    loqM: limits.loq,
    lowestStandardM,
    lodExtrapolated: lowestStandardM !== null && limits.lod < lowestStandardM,
    loqExtrapolated: lowestStandardM !== null && limits.loq < lowestStandardM,
    linearity: mandelTest(x, y),
    concentrationMeanM: fit.xMean,
    absorbanceMean: fit.yMean,
    sxx: fit.sxx,
    points,
  };
}
