import { AnalysisError } from './errors';
import { fitLinear } from './linear-regression';

/** Gas constant, J·mol⁻¹·K⁻¹ (CODATA 2018, exact). */
export const GAS_CONSTANT_J_PER_MOL_K = 8.314462618;

/** ΔH° and ΔS° from K at several temperatures. */
export interface VantHoffResult {
  n: number;
  /** J/mol. */
  deltaHJPerMol: number;
  /** Null with only two temperatures. */
  deltaHSe: number | null;
  /** J·mol⁻¹·K⁻¹. */
  deltaSJPerMolK: number;
  deltaSSe: number | null;
  /** Fit of ln K against 1/T (1/K). */
  slope: number;
  intercept: number;
  r2: number;
}

/**
 * van 't Hoff analysis: ln K = −ΔH°/(R·T) + ΔS°/R, fitted by least squares of ln K against 1/T,
 * so ΔH° = −R·slope and ΔS° = R·intercept (standard errors scale the same way). Assumes ΔH° constant
 * over the range and K on a consistent standard-state basis.
 *
 * Units: temperature °C (converted with T = t + 273.15 K), K in any fixed unit, ΔH° J/mol, ΔS° J·mol⁻¹·K⁻¹.
 * Reference: Atkins P. & de Paula J., Physical Chemistry, §6.2 (van 't Hoff equation); R from CODATA 2018.
 *
 * @param points K measured at each temperature (at least 2 temperatures)
 * @example
 * vantHoff([{ temperatureC: 15, k: 160 }, { temperatureC: 25, k: 120 }, { temperatureC: 35, k: 92 }]).deltaHJPerMol; // ≈ −2.1e4
 */
export function vantHoff(points: readonly { temperatureC: number; k: number }[]): VantHoffResult {
  if (points.length < 2)
    throw new AnalysisError('too-few-points', "van 't Hoff needs K at two or more temperatures");
  for (const p of points) {
    if (!(p.k > 0)) throw new AnalysisError('invalid-input', 'every K must be positive');
    if (!(p.temperatureC > -273.15))
      throw new AnalysisError('invalid-input', 'temperature must be above absolute zero');
  }
  const x = points.map((p) => 1 / (p.temperatureC + 273.15));
  const y = points.map((p) => Math.log(p.k));
  const R = GAS_CONSTANT_J_PER_MOL_K;
  if (points.length === 2) {
    const slope = (y[1] - y[0]) / (x[1] - x[0]);
    if (!Number.isFinite(slope)) throw new AnalysisError('singular', 'the two temperatures must differ');
    const intercept = y[0] - slope * x[0];
    return {
      n: 2,
      deltaHJPerMol: -R * slope,
      deltaHSe: null,
      deltaSJPerMolK: R * intercept,
      deltaSSe: null,
      slope,
      intercept,
      r2: 1,
    };
  }
  const fit = fitLinear(x, y);
  return {
    n: fit.n,
    deltaHJPerMol: -R * fit.slope,
    deltaHSe: R * fit.slopeSe,
    deltaSJPerMolK: R * fit.intercept,
    deltaSSe: fit.interceptSe !== null ? R * fit.interceptSe : null,
    slope: fit.slope,
    intercept: fit.intercept,
    r2: fit.r2,
  };
}
