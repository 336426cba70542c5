import { ConcentrationUnit, reportingUnitProblem } from './concentration-units';
import { AnalysisError } from './errors';
import { InputUncertainties } from './mixture-measurement';
import { parseStoichiometry } from './stoichiometry-model';

/** A position left out of the analysis by a person, with the reason they gave. */
export interface Exclusion {
  position: string;
  reason: string;
}

/**
 * Analysis settings as a batch, instrument profile or user gives them: every field is optional and
 * {@link resolveAnalysisSettings} fills in the defaults. Thresholds marked "common practice" are
 * conventions of the trade, not standards; a lab may set its own.
 */
export interface AnalysisSettings {
  /** Wavelength to analyse, nm. Default: the only wavelength present, else the most frequent. */
  wavelengthNm?: number | null;
  /** Readings within this distance of the wavelength count, nm. Default 0.5. */
  wavelengthToleranceNm?: number;
  /** Path length of the batch, cm. Default 1. */
  pathLengthCm?: number;
  /** Per-position path lengths (plates: fill volume or water peak), cm; absorbances are scaled to `pathLengthCm`. */
  pathLengthByPositionCm?: Record<string, number>;
  /** Calibration line with or without intercept. Default 'linear'. */
  calibrationModel?: 'linear' | 'through-origin';
  /** Absorbance ceiling of the linear range. Default 1.0 (common practice). */
  linearRangeMaxAbsorbance?: number;
  /** |externally studentised residual| that flags a standard. Default 3 (common practice). */
  outlierStudentizedResidual?: number;
  /** Calibration R² below this is flagged. Default 0.995 (common practice). */
  r2Min?: number;
  /** Replicate CV (fraction) above this is flagged. Default 0.05 (common practice). */
  replicateCvMax?: number;
  /** Corrected absorbance below −tolerance is flagged as negative. Default 0.005. */
  negativeAbsorbanceTolerance?: number;
  /** Candidate stoichiometries "a:b" (A:B). Default 1:1, 1:2, 2:1, 1:3. */
  candidates?: string[];
  /** K CV (fraction) above which K is "not constant". Default 0.15 (common practice). */
  kCvMax?: number;
  /** ΔAIC under which the two best candidates are indistinguishable. Default 2 (Burnham & Anderson 2002). */
  ambiguityDeltaAic?: number;
  /** ΔAIC over which a candidate is ruled out. Default 10 (Burnham & Anderson 2002). */
  ruledOutDeltaAic?: number;
  /** Fit a constant absorbance offset in the global fits. Default false. */
  fitBaseline?: boolean;
  /**
   * ε of the complex, L·mol⁻¹·cm⁻¹ (typed, or taken from another batch). Default: from this batch's
   * calibration. When a batch has ε, the headline global fit holds it fixed and the per-mixture K uses it.
   */
  epsilonLPerMolCm?: number | null;
  /** Standard uncertainty of a given ε, L·mol⁻¹·cm⁻¹ (propagated into K). Default 0. */
  epsilonSeLPerMolCm?: number | null;
  /** Positions to leave out, with reasons. */
  exclusions?: Exclusion[];
  job?: { relativeTolerance?: number; minPoints?: number };
  /** Mole-ratio series: the fixed reactant's relative tolerance (default 0.02) and points (default 6). */
  moleRatio?: { relativeTolerance?: number; minPoints?: number };
  benesiHildebrand?: { minExcessRatio?: number; minPoints?: number };
  uncertainty?: Partial<InputUncertainties>;
  /** Draws (0 = off) and seed of the Monte Carlo for K. Default 0 draws, seed 1. */
  monteCarlo?: { draws?: number; seed?: number };
  /** Levenberg–Marquardt limits. */
  fit?: { maxIterations?: number; parameterTolerance?: number };
  /**
   * Unit the batch reports concentrations in. Default mol/L. Results stay in mol/L; screens, reports and
   * mails convert (`concentration-units.ts`).
   */
  concentrationUnit?: ConcentrationUnit;
  /** Molar mass of the analyte, g/mol: needed for mg/L and µg/L. Default none. */
  molarMassGPerMol?: number | null;
  /** Acceptance limits of a control's recovery, % [low, high]. Default 90–110 % (common practice). */
  recoveryLimitsPct?: readonly [number, number];
  /** Equilibrium root-finder limits. */
  solver?: { tolerance?: number; maxIterations?: number };
}

/** Settings with every default filled in: what the analysis actually used (echoed in the result). */
export interface ResolvedAnalysisSettings {
  wavelengthNm: number | null;
  wavelengthToleranceNm: number;
  pathLengthCm: number;
  pathLengthByPositionCm: Record<string, number>;
  calibrationModel: 'linear' | 'through-origin';
  linearRangeMaxAbsorbance: number;
  outlierStudentizedResidual: number;
  r2Min: number;
  replicateCvMax: number;
  negativeAbsorbanceTolerance: number;
  candidates: string[];
  kCvMax: number;
  ambiguityDeltaAic: number;
  ruledOutDeltaAic: number;
  fitBaseline: boolean;
  epsilonLPerMolCm: number | null;
  epsilonSeLPerMolCm: number;
  exclusions: Exclusion[];
  job: { relativeTolerance: number; minPoints: number };
  moleRatio: { relativeTolerance: number; minPoints: number };
  benesiHildebrand: { minExcessRatio: number; minPoints: number };
  uncertainty: InputUncertainties;
  monteCarlo: { draws: number; seed: number };
  fit: { maxIterations: number; parameterTolerance: number };
  solver: { tolerance: number; maxIterations: number };
  concentrationUnit: ConcentrationUnit;
  molarMassGPerMol: number | null;
  recoveryLimitsPct: [number, number];
}

/**
 * Default input uncertainties. Pipette: ISO 8655-2:2002 at 1000 µL, random CV 0.3 % combined with the
 * 0.8 % systematic limit taken as rectangular (0.8 %/√3): √(0.3² + 0.46²) ≈ 0.55 %. Flask: ASTM E288
 * class A 10 mL ± 0.02 mL as rectangular: 0.2 %/√3 ≈ 0.12 %. Stock: 0.5 % (common practice).
 * Absorbance: null = the global fit's residual SD.
 */
export const DEFAULT_INPUT_UNCERTAINTIES: InputUncertainties = {
  pipetteRelSd: 0.0055,
  flaskRelSd: 0.0012,
  stockRelSd: 0.005,
  absorbanceSd: null,
};

function positive(name: string, v: number): number {
  if (!(v > 0) || !Number.isFinite(v))
    throw new AnalysisError('invalid-settings', `${name} must be a positive number`);
  return v;
}

function nonNegative(name: string, v: number): number {
  if (!(v >= 0) || !Number.isFinite(v))
    throw new AnalysisError('invalid-settings', `${name} must be a number ≥ 0`);
  return v;
}

/**
 * The defaults a batch's settings start from (the batch form shows them; the server stores them;
 * {@link resolveAnalysisSettings} falls back to them). Sources as documented on {@link AnalysisSettings}.
 */
export const ANALYSIS_DEFAULTS = Object.freeze({
  candidates: Object.freeze(['1:1', '1:2', '2:1', '1:3']) as readonly string[],
  pathLengthCm: 1,
  calibrationModel: 'linear' as 'linear' | 'through-origin',
  linearRangeMaxAbsorbance: 1,
  r2Min: 0.995,
  /** Fraction (0.05 = 5 %). */
  replicateCvMax: 0.05,
  /** Fraction (0.15 = 15 %). */
  kCvMax: 0.15,
  fitBaseline: false,
  concentrationUnit: 'mol/L' as ConcentrationUnit,
  /** Per cent [low, high] (common practice for a check standard). */
  recoveryLimitsPct: Object.freeze([90, 110]) as readonly [number, number],
});

/** Recovery limits checked: 0 ≤ low < high ≤ 1000 %. */
function recoveryLimits(limits: readonly [number, number]): [number, number] {
  const [low, high] = limits;
  if (
    limits.length !== 2 ||
    !Number.isFinite(low) ||
    !Number.isFinite(high) ||
    low < 0 ||
    high > 1000 ||
    !(low < high)
  ) {
    throw new AnalysisError(
      'invalid-settings',
      'recovery limits must be two per cent values, low below high',
    );
  }
  return [low, high];
}

/**
 * Resolves and checks analysis settings once: fills every default and rejects impossible values
 * (non-positive path length, malformed stoichiometry, negative tolerances…).
 *
 * Units: as named in {@link AnalysisSettings}.
 * Reference: defaults documented per field (ICH Q2, ISO 8655-2, ASTM E288, Burnham & Anderson, common practice).
 *
 * @throws AnalysisError 'invalid-settings'
 * @example
 * resolveAnalysisSettings({ pathLengthCm: 0.5 }).linearRangeMaxAbsorbance; // 1
 */
export function resolveAnalysisSettings(settings: AnalysisSettings = {}): ResolvedAnalysisSettings {
  const s = settings;
  const candidates = s.candidates ?? [...ANALYSIS_DEFAULTS.candidates];
  if (candidates.length === 0)
    throw new AnalysisError('invalid-settings', 'at least one candidate stoichiometry is needed');
  const labels = candidates.map((c) => parseStoichiometry(c).label);
  const byPosition: Record<string, number> = {};
  for (const [pos, l] of Object.entries(s.pathLengthByPositionCm ?? {}))
    byPosition[pos.toUpperCase()] = positive(`path length of ${pos}`, l);
  const exclusions = (s.exclusions ?? []).map((e) => {
    if (!e.position || !e.reason || !e.reason.trim()) {
      throw new AnalysisError('invalid-settings', 'every exclusion needs a position and a reason');
    }
    return { position: e.position.toUpperCase(), reason: e.reason.trim() };
  });
  const draws = s.monteCarlo?.draws ?? 0;
  if (!Number.isInteger(draws) || draws < 0 || (draws > 0 && draws < 10)) {
    throw new AnalysisError('invalid-settings', 'Monte Carlo draws must be 0 (off) or an integer ≥ 10');
  }
  const u = { ...DEFAULT_INPUT_UNCERTAINTIES, ...(s.uncertainty ?? {}) };
  const concentrationUnit = s.concentrationUnit ?? ANALYSIS_DEFAULTS.concentrationUnit;
  const unitProblem = reportingUnitProblem(concentrationUnit, s.molarMassGPerMol);
  if (unitProblem) throw new AnalysisError('invalid-settings', unitProblem);
  return {
    wavelengthNm: s.wavelengthNm == null ? null : positive('wavelength', s.wavelengthNm),
    wavelengthToleranceNm: nonNegative('wavelength tolerance', s.wavelengthToleranceNm ?? 0.5),
    pathLengthCm: positive('path length', s.pathLengthCm ?? ANALYSIS_DEFAULTS.pathLengthCm),
    pathLengthByPositionCm: byPosition,
    calibrationModel: s.calibrationModel ?? ANALYSIS_DEFAULTS.calibrationModel,
    linearRangeMaxAbsorbance: positive(
      'linear-range ceiling',
      s.linearRangeMaxAbsorbance ?? ANALYSIS_DEFAULTS.linearRangeMaxAbsorbance,
    ),
    outlierStudentizedResidual: positive('outlier limit', s.outlierStudentizedResidual ?? 3),
    r2Min: nonNegative('minimum R²', s.r2Min ?? ANALYSIS_DEFAULTS.r2Min),
    replicateCvMax: positive('maximum replicate CV', s.replicateCvMax ?? ANALYSIS_DEFAULTS.replicateCvMax),
    negativeAbsorbanceTolerance: nonNegative(
      'negative-absorbance tolerance',
      s.negativeAbsorbanceTolerance ?? 0.005,
    ),
    candidates: [...new Set(labels)],
    kCvMax: positive('maximum K CV', s.kCvMax ?? ANALYSIS_DEFAULTS.kCvMax),
    ambiguityDeltaAic: nonNegative('ambiguity ΔAIC', s.ambiguityDeltaAic ?? 2),
    ruledOutDeltaAic: positive('ruled-out ΔAIC', s.ruledOutDeltaAic ?? 10),
    fitBaseline: s.fitBaseline ?? ANALYSIS_DEFAULTS.fitBaseline,
    epsilonLPerMolCm: s.epsilonLPerMolCm == null ? null : positive('ε', s.epsilonLPerMolCm),
    epsilonSeLPerMolCm: nonNegative('standard uncertainty of ε', s.epsilonSeLPerMolCm ?? 0),
    exclusions,
    job: {
      relativeTolerance: positive('Job total tolerance', s.job?.relativeTolerance ?? 0.02),
      minPoints: Math.max(4, Math.floor(s.job?.minPoints ?? 5)),
    },
    moleRatio: {
      relativeTolerance: positive('mole-ratio tolerance', s.moleRatio?.relativeTolerance ?? 0.02),
      minPoints: Math.max(5, Math.floor(s.moleRatio?.minPoints ?? 6)),
    },
    benesiHildebrand: {
      minExcessRatio: positive('Benesi–Hildebrand excess ratio', s.benesiHildebrand?.minExcessRatio ?? 10),
      minPoints: Math.max(3, Math.floor(s.benesiHildebrand?.minPoints ?? 3)),
    },
    uncertainty: {
      pipetteRelSd: nonNegative('pipette relative SD', u.pipetteRelSd),
      flaskRelSd: nonNegative('flask relative SD', u.flaskRelSd),
      stockRelSd: nonNegative('stock relative SD', u.stockRelSd),
      absorbanceSd: u.absorbanceSd == null ? null : nonNegative('absorbance SD', u.absorbanceSd),
    },
    monteCarlo: { draws, seed: Math.floor(s.monteCarlo?.seed ?? 1) },
    fit: {
      maxIterations: Math.floor(positive('fit iterations', s.fit?.maxIterations ?? 200)),
      parameterTolerance: positive('fit tolerance', s.fit?.parameterTolerance ?? 1e-11),
    },
    solver: {
      tolerance: positive('solver tolerance', s.solver?.tolerance ?? 1e-14),
      maxIterations: Math.floor(positive('solver iterations', s.solver?.maxIterations ?? 100)),
    },
    concentrationUnit,
    molarMassGPerMol: s.molarMassGPerMol ?? null,
    recoveryLimitsPct: recoveryLimits(s.recoveryLimitsPct ?? ANALYSIS_DEFAULTS.recoveryLimitsPct),
  };
}
