import { EpsilonSource } from './batch-types';
import { CalibrationResult } from './calibration';
import { ResolvedAnalysisSettings } from './options';

/**
 * Where a batch's ε of the complex comes from: a value given in the settings (typed, or taken from
 * another batch's calibration) wins; else this batch's own standards, read through the calibration line
 * (A − intercept)/slope exactly as the unknowns are; else none, and the global fits estimate ε with K.
 *
 * Units: ε L·mol⁻¹·cm⁻¹; intercept absorbance.
 * Reference: Beer–Lambert law A = ε·l·c; ICH Q2(R1) (the calibration line read backwards).
 *
 * @example
 * epsilonSourceOf(resolveAnalysisSettings({ epsilonLPerMolCm: 4700 }), null).kind; // "given"
 */
export function epsilonSourceOf(
  s: ResolvedAnalysisSettings,
  calibration: CalibrationResult | null,
): EpsilonSource {
  if (s.epsilonLPerMolCm !== null) {
    return {
      kind: 'given',
      epsilonLPerMolCm: s.epsilonLPerMolCm,
      epsilonSe: s.epsilonSeLPerMolCm,
      interceptAbsorbance: 0,
      interceptSe: 0,
      epsilonInterceptCov: 0,
      note: 'ε given in the settings (typed, or from another batch); the global fit holds it fixed and no intercept is subtracted',
    };
  }
  if (calibration) {
    return {
      kind: 'standards',
      epsilonLPerMolCm: calibration.epsilonLPerMolCm,
      epsilonSe: calibration.epsilonSe,
      interceptAbsorbance: calibration.intercept,
      interceptSe: calibration.interceptSe ?? 0,
      // OLS: cov(S, b) = −x̄·s²/Sxx, and ε = S/l.
      epsilonInterceptCov:
        calibration.model === 'linear'
          ? (-calibration.concentrationMeanM * calibration.residualSd ** 2) /
            calibration.sxx /
            calibration.pathLengthCm
          : 0,
      note:
        calibration.model === 'linear'
          ? 'ε from this batch’s standards; the global fit holds it fixed, and mixtures are read through the calibration line (absorbance − intercept) as the unknowns are'
          : 'ε from this batch’s standards (line through the origin); the global fit holds it fixed',
    };
  }
  return {
    kind: 'none',
    epsilonLPerMolCm: null,
    epsilonSe: null,
    interceptAbsorbance: 0,
    interceptSe: 0,
    epsilonInterceptCov: 0,
    note: 'no ε (no calibration and none given): the global fits estimate ε with K; per-mixture K is not computed',
  };
}
