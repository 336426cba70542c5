import { ReplicateGroup } from './batch-step-replicates';
import { QcCode, UnknownResult } from './batch-types';
import { CalibrationResult } from './calibration';
import { concentrationFromAbsorbance } from './inverse-prediction';
import { ResolvedAnalysisSettings } from './options';

/** The unknowns step: unknowns and controls read back through the calibration. */
export interface UnknownsStep {
  unknowns: UnknownResult[];
  controls: UnknownResult[];
}

/**
 * One replicate group read back: c = (Ā − intercept)/slope × dilution factor, with its standard error
 * from the calibration (inverse prediction), flagged below LOD, below LOQ (the measured, undiluted
 * concentration against the calibration's limits) and above the linear range (the mean absorbance).
 * Without a calibration or a usable reading the concentration is null.
 *
 * Units: concentration mol/L (of the original sample, after the dilution factor), absorbance
 * dimensionless.
 * Reference: ICH Q2(R1); Miller & Miller, Statistics and Chemometrics for Analytical Chemistry (the
 * inverse prediction), via `inverse-prediction.ts`.
 *
 * @example
 * readBack(group, calibration, s); // { sampleId: 'U1', concentrationM: 3.0e-3, seM: 2e-5, flags: [], … }
 */
export function readBack(
  g: ReplicateGroup,
  calibration: CalibrationResult | null,
  s: ResolvedAnalysisSettings,
): UnknownResult {
  const { mean, n } = g;
  const dilutionFactor = g.sample.dilutionFactor ?? 1;
  const flags: QcCode[] = [];
  let concentrationM: number | null = null;
  let seM: number | null = null;
  if (calibration && mean !== null && n > 0) {
    const r = concentrationFromAbsorbance(calibration, mean, n, dilutionFactor);
    concentrationM = r.concentrationM;
    seM = r.seM;
    const measured = r.concentrationM / dilutionFactor;
    if (measured < calibration.lodM) flags.push('below-lod');
    else if (measured < calibration.loqM) flags.push('below-loq');
    if (mean > s.linearRangeMaxAbsorbance) flags.push('above-linear-range');
  }
  return {
    sampleId: g.sample.sampleId,
    group: g.sample.replicateGroup ?? g.positions[0].position,
    positions: g.positions.map((p) => p.position),
    n,
    absorbance: mean,
    dilutionFactor,
    concentrationM,
    seM,
    flags,
  };
}

/**
 * Reads back every unknown and every control group (see `readBack`), in group order.
 *
 * @example
 * readBackUnknowns(replicates.groups, calibration, s).unknowns.map((u) => u.concentrationM);
 */
export function readBackUnknowns(
  groups: readonly ReplicateGroup[],
  calibration: CalibrationResult | null,
  s: ResolvedAnalysisSettings,
): UnknownsStep {
  return {
    unknowns: groups.filter((g) => g.sample.role === 'unknown').map((g) => readBack(g, calibration, s)),
    controls: groups.filter((g) => g.sample.role === 'control').map((g) => readBack(g, calibration, s)),
  };
}
