import { AnalysisError } from './errors';
import { solveEquilibrium } from './equilibrium-solve';
import { parseStoichiometry } from './stoichiometry-model';

/** A Job's series: constant A₀ + B₀, varying mole fraction of B. */
export interface JobSeriesTarget {
  kind: 'job';
  /** A₀ + B₀ in every mixture, mol/L. */
  totalConcentrationM: number;
  /** Mole fractions of B, each in [0, 1]. */
  moleFractionsB: readonly number[];
}

/** A series at fixed A₀ with B in increasing excess. */
export interface ExcessSeriesTarget {
  kind: 'excess';
  /** A₀ in every mixture, mol/L. */
  a0M: number;
  /** B₀/A₀ per mixture. */
  ratiosBToA: readonly number[];
}

export interface PlannerInput {
  /** Stock concentrations, mol/L. */
  stockAM: number;
  stockBM: number;
  /** Final volume of every mixture, mL. */
  totalVolumeMl: number;
  series: JobSeriesTarget | ExcessSeriesTarget;
  /** Assumed stoichiometry "a:b" (default "1:1"), K (M^(1−a−b)) and ε of the complex (L·mol⁻¹·cm⁻¹). */
  model?: string;
  kAssumed: number;
  epsilonLPerMolCm: number;
  /** cm, default 1. */
  pathLengthCm?: number;
  /** Round volumes to this step, mL (e.g. 0.01); default no rounding. */
  volumeStepMl?: number;
  /** Warn above this predicted absorbance. Default 1.0 (common practice). */
  linearRangeMaxAbsorbance?: number;
  /** Warn when the predicted complex concentration is below this LOQ, mol/L (e.g. from a calibration). */
  loqM?: number;
}

/** One planned mixture. */
export interface PlannedMixture {
  index: number;
  volumeAMl: number;
  volumeBMl: number;
  /** Solvent to make up to the total volume, mL. */
  diluentMl: number;
  a0M: number;
  b0M: number;
  productM: number;
  predictedAbsorbance: number;
  warnings: string[];
}

export interface MixturePlan {
  model: string;
  mixtures: PlannedMixture[];
  /** Cautions shown with every plan. */
  cautions: string[];
}

/** Shown with every plan: the product does arithmetic, not a safety assessment. */
export const PLANNER_CAUTIONS: readonly string[] = [
  'Reagents used for complex formation can be corrosive or oxidising, and some salts (for example thiocyanates or cyanides) release toxic gas in contact with acid.',
  'Wear the eye and hand protection your lab requires, work in a fume hood where the safety data sheet asks for one, and dispose of waste as your local rules require.',
  "This plan is arithmetic only: the safety data sheets, your institution's rules and your lab's own procedures take precedence.",
];

/**
 * Mixture planner: volumes V_A = A₀·V_T/c_A and V_B = B₀·V_T/c_B (C₁V₁ = C₂V₂) for a Job's series
 * (A₀ = (1 − x)·C_T, B₀ = x·C_T) or an excess series (B₀ = r·A₀), and the predicted absorbance
 * A = ε·l·x_eq from the exact equilibrium at the assumed K. Warns for mixtures that cannot be made
 * (volumes exceed the total), are predicted above the linear range, or below the LOQ.
 *
 * Units: concentrations mol/L, volumes mL, path length cm, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Job P. (1928) Ann. Chim. 9, 113 (constant-total series); dilution rule; law of mass action.
 *
 * @example
 * planMixtures({ stockAM: 2e-3, stockBM: 2e-3, totalVolumeMl: 10, kAssumed: 98, epsilonLPerMolCm: 4700,
 *   series: { kind: 'job', totalConcentrationM: 1e-3, moleFractionsB: [0.2, 0.5, 0.8] } }).mixtures[1].volumeAMl; // 2.5
 */
export function planMixtures(input: PlannerInput): MixturePlan {
  const model = parseStoichiometry(input.model ?? '1:1');
  const l = input.pathLengthCm ?? 1;
  const ceiling = input.linearRangeMaxAbsorbance ?? 1;
  const { stockAM, stockBM, totalVolumeMl: vt } = input;
  if (!(stockAM > 0) || !(stockBM > 0) || !(vt > 0) || !(l > 0)) {
    throw new AnalysisError(
      'invalid-input',
      'stock concentrations, total volume and path length must be positive',
    );
  }
  const targets: { a0M: number; b0M: number }[] =
    input.series.kind === 'job'
      ? input.series.moleFractionsB.map((x) => {
          if (!(x >= 0 && x <= 1))
            throw new AnalysisError('invalid-input', 'mole fractions must lie in [0, 1]');
          const c = (input.series as JobSeriesTarget).totalConcentrationM;
          return { a0M: (1 - x) * c, b0M: x * c };
        })
      : input.series.ratiosBToA.map((r) => {
          if (!(r >= 0)) throw new AnalysisError('invalid-input', 'ratios must be ≥ 0');
          const a0 = (input.series as ExcessSeriesTarget).a0M;
          return { a0M: a0, b0M: r * a0 };
        });
  const round = (v: number): number =>
    input.volumeStepMl ? Math.round(v / input.volumeStepMl) * input.volumeStepMl : v;
  const mixtures = targets.map((t, index): PlannedMixture => {
    const volumeAMl = round((t.a0M * vt) / stockAM);
    const volumeBMl = round((t.b0M * vt) / stockBM);
    const a0M = (stockAM * volumeAMl) / vt;
    const b0M = (stockBM * volumeBMl) / vt;
    const diluentMl = vt - volumeAMl - volumeBMl;
    const warnings: string[] = [];
    if (diluentMl < -1e-9 * vt)
      warnings.push('cannot be made: the stock volumes exceed the total volume (use stronger stocks)');
    const productM = solveEquilibrium(input.kAssumed, a0M, b0M, model).productM;
    const predictedAbsorbance = input.epsilonLPerMolCm * l * productM;
    if (predictedAbsorbance > ceiling)
      warnings.push(
        `predicted absorbance ${predictedAbsorbance.toFixed(3)} is above the linear range (${ceiling})`,
      );
    if (input.loqM !== undefined && productM < input.loqM)
      warnings.push(
        `predicted absorbance ${predictedAbsorbance.toFixed(3)} is below the LOQ (${(input.epsilonLPerMolCm * l * input.loqM).toFixed(3)} as absorbance): predicted complex concentration is below the LOQ`,
      );
    return {
      index: index + 1,
      volumeAMl,
      volumeBMl,
      diluentMl: Math.max(0, diluentMl),
      a0M,
      b0M,
      productM,
      predictedAbsorbance,
      warnings,
    };
  });
  return { model: model.label, mixtures, cautions: [...PLANNER_CAUTIONS] };
}

/** The planner's input for wells: the same series and model, with the well's fill volume in µL. */
export interface WellPlannerInput extends Omit<PlannerInput, 'totalVolumeMl' | 'volumeStepMl'> {
  /** Fill volume of every well, µL (from the instrument profile or typed). */
  fillVolumeUl: number;
  /** Round volumes to this step, µL (e.g. 1, a common pipette step); default no rounding. */
  volumeStepUl?: number;
}

/** One planned well: the mixture (volumes also in mL) and its volumes in µL. */
export interface PlannedWellMixture extends PlannedMixture {
  volumeAUl: number;
  volumeBUl: number;
  diluentUl: number;
}

export interface WellMixturePlan extends Omit<MixturePlan, 'mixtures'> {
  fillVolumeUl: number;
  mixtures: PlannedWellMixture[];
}

/**
 * The mixture plan for plate wells, in µL: V_A = A₀·V_fill/c_A, V_B = B₀·V_fill/c_B and the diluent
 * V_fill − V_A − V_B, so each well's volumes add up to the fill volume (dilution rule C₁V₁ = C₂V₂).
 * The rule is linear in the volume, so the plan is computed with V_T in µL (and rounded to a µL step);
 * the mL fields are the same volumes divided by 1000.
 *
 * @example
 * planWellMixtures({ stockAM: 2e-3, stockBM: 2e-3, fillVolumeUl: 200, kAssumed: 98, epsilonLPerMolCm: 4700,
 *   series: { kind: 'job', totalConcentrationM: 1e-3, moleFractionsB: [0.5] } }).mixtures[0].volumeAUl; // 50
 */
export function planWellMixtures(input: WellPlannerInput): WellMixturePlan {
  const { fillVolumeUl, volumeStepUl, ...rest } = input;
  if (!(fillVolumeUl > 0))
    throw new AnalysisError('invalid-input', 'the fill volume of a well must be positive');
  if (volumeStepUl !== undefined && !(volumeStepUl > 0))
    throw new AnalysisError('invalid-input', 'the volume step must be positive');
  const plan = planMixtures({ ...rest, totalVolumeMl: fillVolumeUl, volumeStepMl: volumeStepUl });
  return {
    ...plan,
    fillVolumeUl,
    mixtures: plan.mixtures.map((m) => ({
      ...m,
      volumeAUl: m.volumeAMl,
      volumeBUl: m.volumeBMl,
      diluentUl: m.diluentMl,
      volumeAMl: m.volumeAMl / 1000,
      volumeBMl: m.volumeBMl / 1000,
      diluentMl: m.diluentMl / 1000,
      warnings: m.warnings.map((w) => w.replace('the total volume', 'the fill volume')),
    })),
  };
}
