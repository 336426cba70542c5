import { ReplicateGroup } from './batch-step-replicates';
import { ControlResult, QcCode, UnknownResult } from './batch-types';
import { CalibrationResult } from './calibration';
import { controlRecovery } from './control-recovery';
import { concentrationFromAbsorbance } from './inverse-prediction';
import { ResolvedAnalysisSettings } from './options';

/** The unknowns step: unknowns and controls read back through the calibration. */
export interface UnknownsStep {
  unknowns: UnknownResult[];
  controls: ControlResult[];
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
 * One control group read back (see `readBack`) and compared with its nominal concentration (the
 * manifest's concentration_M): recovery = measured / nominal × 100 %, flagged `recovery-out-of-limits`
 * outside the batch's limits (see `control-recovery.ts`).
 *
 * Units: concentrations mol/L, recovery and limits %.
 *
 * @example
 * readBackControl(group, calibration, s); // { sampleId: 'CHECK', recoveryPct: 98.3, flags: [], … }
 */
export function readBackControl(
  g: ReplicateGroup,
  calibration: CalibrationResult | null,
  s: ResolvedAnalysisSettings,
): ControlResult {
  const read = readBack(g, calibration, s);
  const { nominalM, recoveryPct, withinLimits } = controlRecovery(
    read.concentrationM,
    g.sample.concentrationM,
    s.recoveryLimitsPct,
  );
  const flags: QcCode[] = withinLimits === false ? [...read.flags, 'recovery-out-of-limits'] : read.flags;
  return { ...read, flags, nominalM, recoveryPct };
}

/**
 * Reads back every unknown and every control group (see `readBack`, `readBackControl`), in group order.
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
    controls: groups
      .filter((g) => g.sample.role === 'control')
      .map((g) => readBackControl(g, calibration, s)),
  };
}
