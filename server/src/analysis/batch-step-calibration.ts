import { PositionResult } from './batch-types';
import { calibrate, CalibrationResult, CalibrationStandard } from './calibration';
import { ResolvedAnalysisSettings } from './options';
import { SampleDefinition } from './types';

/** The calibration step: the line (or null) and how many standards it had and needed. */
export interface CalibrationStep {
  calibration: CalibrationResult | null;
  /** Usable standard positions with a concentration. */
  standardsUsed: number;
  /** Standards the model needs: 3 for a line with intercept, 2 through the origin. */
  standardsNeeded: number;
  warnings: string[];
}

/** The message of a thrown value, as a warning quotes it. */
export function messageOf(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** The standards that can enter the calibration, and a warning for each one without a concentration. */
export function usableStandards(
  positions: readonly PositionResult[],
  sampleByPosition: ReadonlyMap<string, SampleDefinition>,
): { standards: CalibrationStandard[]; warnings: string[] } {
  const standards: CalibrationStandard[] = [];
  const warnings: string[] = [];
  for (const p of positions) {
    if (p.role !== 'standard' || p.status !== 'used' || p.absorbanceCorrected === null) continue;
    const c = sampleByPosition.get(p.position)?.concentrationM;
    if (c === undefined || !Number.isFinite(c)) {
      warnings.push(`standard at ${p.position} has no concentration and was not used`);
      continue;
    }
    standards.push({
      concentrationM: c,
      absorbance: p.absorbanceCorrected,
      position: p.position,
      sampleId: p.sampleId ?? undefined,
    });
  }
  return { standards, warnings };
}

/** The warning that LOD and/or LOQ were extrapolated below the lowest standard, or none. */
function extrapolationWarnings(c: CalibrationResult): string[] {
  if (!c.lodExtrapolated && !c.loqExtrapolated) return [];
  return [
    `${c.lodExtrapolated ? 'LOD' : ''}${c.lodExtrapolated && c.loqExtrapolated ? ' and ' : ''}${c.loqExtrapolated ? 'LOQ' : ''} ` +
      `lie below the lowest standard: extrapolated, not measured`,
  ];
}

/**
 * Beer–Lambert calibration on the individual standard positions (not their replicate means): the
 * corrected absorbance against the known concentration, with intercept or through the origin as the
 * settings say, outliers by studentised residual, Mandel's linearity test, LOD and LOQ. With fewer
 * standards than the model needs there is no calibration (the QC step says so); a calibration that
 * fails is a warning, never an exception.
 *
 * Units: concentration mol/L, absorbance dimensionless, path cm, slope/path = ε L·mol⁻¹·cm⁻¹.
 * Reference: ICH Q2(R1) (linearity, LOD = 3.3 σ/S, LOQ = 10 σ/S); ISO 8466-1 (Mandel's test), via
 * `calibration.ts`.
 *
 * @example
 * calibrateStandards(blanked.positions, located.sampleByPosition, s).calibration?.epsilonLPerMolCm; // ≈ 1250
 */
export function calibrateStandards(
  positions: readonly PositionResult[],
  sampleByPosition: ReadonlyMap<string, SampleDefinition>,
  s: ResolvedAnalysisSettings,
): CalibrationStep {
  const { standards, warnings } = usableStandards(positions, sampleByPosition);
  const standardsNeeded = s.calibrationModel === 'linear' ? 3 : 2;
  const base = { standardsUsed: standards.length, standardsNeeded };
  if (standards.length < standardsNeeded) return { calibration: null, ...base, warnings };
  let calibration: CalibrationResult;
  try {
    calibration = calibrate(standards, {
      pathLengthCm: s.pathLengthCm,
      throughOrigin: s.calibrationModel === 'through-origin',
      linearRangeMaxAbsorbance: s.linearRangeMaxAbsorbance,
      outlierStudentizedResidual: s.outlierStudentizedResidual,
    });
  } catch (e) {
    return { calibration: null, ...base, warnings: [...warnings, `calibration failed: ${messageOf(e)}`] };
  }
  return { calibration, ...base, warnings: [...warnings, ...extrapolationWarnings(calibration)] };
}
