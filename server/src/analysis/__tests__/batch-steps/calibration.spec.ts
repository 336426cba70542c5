import { correctForBlank } from '../../batch-step-blank';
import { calibrateStandards, messageOf, usableStandards } from '../../batch-step-calibration';
import { resolvePositions } from '../../batch-step-positions';
import { resolveAnalysisSettings } from '../../options';
import { AnalysisSettings } from '../../options';
import { Reading, SampleDefinition } from '../../types';
import { lre, readJson, readXy } from '../reference-data';

interface LinearCertified {
  parameters: Record<string, { estimate: number; std_dev: number }>;
  residual_standard_deviation: number;
  r_squared: number;
}

/** Standards at the given (x, y) as cuvettes C1…, no blank: the step sees y as the corrected absorbance. */
function run(x: readonly number[], y: readonly number[], settings: AnalysisSettings) {
  const samples: SampleDefinition[] = x.map((c, i) => ({
    position: `C${i + 1}`,
    sampleId: `S${i + 1}`,
    role: 'standard',
    concentrationM: c,
  }));
  const readings: Reading[] = y.map((a, i) => ({ position: `C${i + 1}`, wavelengthNm: 500, absorbance: a }));
  const s = resolveAnalysisSettings(settings);
  const located = resolvePositions(readings, samples, s);
  const blanked = correctForBlank(located.positions, s);
  return { step: calibrateStandards(blanked.positions, located.sampleByPosition, s), blanked, located };
}

describe('calibration step', () => {
  it('fits the NIST StRD Norris line through the batch (certified slope, intercept, R², residual SD)', () => {
    // Source: NIST/ITL StRD Norris (shared/reference/Norris_certified.json); the LOD is
    // Norris_derived_checks.json LOD_resid_sd (ICH Q2(R1) 3.3σ/S from the certified values).
    const { x, y } = readXy('Norris');
    const cert = readJson<LinearCertified>('Norris_certified.json');
    const derived = readJson<Record<string, number>>('Norris_derived_checks.json');
    const { step } = run(x, y, {
      pathLengthCm: 2,
      linearRangeMaxAbsorbance: 1e6,
      outlierStudentizedResidual: 1e6,
    });
    const cal = step.calibration!;
    expect(step.standardsUsed).toBe(36);
    expect(step.standardsNeeded).toBe(3);
    expect(lre(cal.slope, cert.parameters.B1.estimate)).toBeGreaterThanOrEqual(9);
    expect(lre(cal.intercept, cert.parameters.B0.estimate)).toBeGreaterThanOrEqual(9);
    expect(lre(cal.r2, cert.r_squared)).toBeGreaterThanOrEqual(9);
    expect(lre(cal.residualSd, cert.residual_standard_deviation)).toBeGreaterThanOrEqual(9);
    // ε = slope / path (Beer–Lambert A = ε·l·c).
    expect(lre(cal.epsilonLPerMolCm, cert.parameters.B1.estimate / 2)).toBeGreaterThanOrEqual(9);
    expect(lre(cal.lodM, derived.LOD_resid_sd)).toBeGreaterThanOrEqual(9);
  });

  it('fits through the origin when asked (NIST StRD NoInt1 certified slope), with two standards enough', () => {
    // Source: NIST/ITL StRD NoInt1 (shared/reference/NoInt1_certified.json).
    const { x, y } = readXy('NoInt1');
    const cert = readJson<LinearCertified>('NoInt1_certified.json');
    const { step } = run(x, y, {
      calibrationModel: 'through-origin',
      linearRangeMaxAbsorbance: 1e6,
      outlierStudentizedResidual: 1e6,
    });
    expect(step.standardsNeeded).toBe(2);
    expect(lre(step.calibration!.slope, cert.parameters.B1.estimate)).toBeGreaterThanOrEqual(9);
    expect(lre(step.calibration!.residualSd, cert.residual_standard_deviation)).toBeGreaterThanOrEqual(9);
  });

  it('has no calibration with too few standards, and says why only through its counts', () => {
    const { step } = run([1e-4, 2e-4], [0.12, 0.25], {});
    expect(step).toEqual({ calibration: null, standardsUsed: 2, standardsNeeded: 3, warnings: [] });
  });

  it('skips a standard without a concentration, with a warning', () => {
    const { blanked, located } = run([1e-4, 2e-4, 3e-4], [0.12, 0.25, 0.37], {});
    const changed = new Map(located.sampleByPosition);
    changed.set('C2', { ...located.sampleByPosition.get('C2')!, concentrationM: undefined });
    const u = usableStandards(blanked.positions, changed);
    expect(u.standards.map((p) => p.position)).toEqual(['C1', 'C3']);
    expect(u.warnings).toEqual(['standard at C2 has no concentration and was not used']);
  });

  it('turns a calibration that cannot be computed into a warning', () => {
    const { step } = run([2e-4, 2e-4, 2e-4], [0.24, 0.25, 0.26], {});
    expect(step.calibration).toBeNull();
    expect(step.warnings).toHaveLength(1);
    expect(step.warnings[0]).toMatch(/^calibration failed: /);
    expect(messageOf(new Error('x'))).toBe('x');
    expect(messageOf('plain')).toBe('plain');
  });

  it('says when LOD and LOQ are extrapolated below the lowest standard', () => {
    // Invented, nearly noise-free standards: σ tiny, so 3.3σ/S lies far below 1×10⁻⁴ M.
    const x = [1e-4, 2e-4, 3e-4, 4e-4, 5e-4];
    const ripple = [0.0002, -0.0001, 0.0001, -0.0002, 0.0001];
    const { step } = run(
      x,
      x.map((c, i) => 1250 * c + ripple[i]),
      {},
    );
    expect(step.calibration?.lodExtrapolated).toBe(true);
    expect(step.warnings).toEqual(['LOD and LOQ lie below the lowest standard: extrapolated, not measured']);
  });
});
