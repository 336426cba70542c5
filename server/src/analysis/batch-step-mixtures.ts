import { ReplicateGroup } from './batch-step-replicates';
import { messageOf } from './batch-step-calibration';
import { EpsilonSource, MixtureResult, QcCode } from './batch-types';
import { CalibrationResult } from './calibration';
import { InitialConcentrations, MixtureRecipe, mixtureInitialConcentrations } from './dilution';
import { epsilonSourceOf } from './epsilon-source';
import { kStatistics } from './k-statistics';
import { MixtureMeasurement } from './mixture-measurement';
import { ResolvedAnalysisSettings } from './options';
import { parseStoichiometry, Stoichiometry } from './stoichiometry-model';

/** A mixture with a usable mean absorbance (at least one used position). */
export interface UsableMixture extends MixtureResult {
  absorbance: number;
}

/** True when the mixture has a mean absorbance from at least one used position. */
export function isUsableMixture(m: MixtureResult): m is UsableMixture {
  return m.absorbance !== null && m.n > 0;
}

/** The mixtures step: each mixture's initial concentrations, product and ICE rows, and what the fits need. */
export interface MixturesStep {
  /** The candidate stoichiometries of the settings, parsed. */
  candidates: Stoichiometry[];
  /** Where ε of the complex came from (standards, typed, or none). */
  epsilonSource: EpsilonSource;
  /** Every mixture whose recipe could be read, in group order. */
  mixtures: MixtureResult[];
  /** The mixtures with a usable absorbance (the same objects), for the fits and cross-checks. */
  usable: UsableMixture[];
  /** The usable mixtures as the uncertainty propagation reads them (recipe, absorbance, path, n). */
  measurements: MixtureMeasurement[];
  warnings: string[];
}

/** The recipe of a mixture row; a missing stock or volume is NaN, so the dilution refuses it. */
function recipeOf(g: ReplicateGroup): MixtureRecipe {
  const sample = g.sample;
  return {
    stockAM: sample.stockAM ?? NaN,
    volumeAMl: sample.volumeAMl ?? NaN,
    stockBM: sample.stockBM ?? NaN,
    volumeBMl: sample.volumeBMl ?? NaN,
    totalVolumeMl: sample.totalVolumeMl,
  };
}

/** C₁V₁ = C₂V₂ for a recipe, or the reason it cannot be read. */
function initialConcentrations(recipe: MixtureRecipe): InitialConcentrations | { error: string } {
  try {
    return mixtureInitialConcentrations(recipe);
  } catch (e) {
    return { error: messageOf(e) };
  }
}

/**
 * One mixture: initial concentrations A₀, B₀ by C₁V₁ = C₂V₂, the mole fraction x_B = B₀/(A₀ + B₀), the
 * complex at equilibrium x = (Ā − intercept)/(ε·l) when ε is known, and per candidate the ICE row
 * (initial, change, equilibrium) with K; a row that would need a negative reactant marks the candidate
 * impossible for this mixture.
 *
 * Units: concentrations mol/L, volumes mL, path cm, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Beer–Lambert law A = ε·l·c; mass balance A₀ = [A] + a·x, B₀ = [B] + b·x (ICE table),
 * e.g. Harris D.C., Quantitative Chemical Analysis, via `k-statistics.ts`.
 */
function mixtureOf(
  g: ReplicateGroup,
  init: InitialConcentrations,
  candidates: readonly Stoichiometry[],
  epsilonSource: EpsilonSource,
  s: ResolvedAnalysisSettings,
): MixtureResult {
  const { mean, n } = g;
  const epsilon = epsilonSource.epsilonLPerMolCm;
  const productM =
    epsilon !== null && mean !== null
      ? (mean - epsilonSource.interceptAbsorbance) / (epsilon * s.pathLengthCm)
      : null;
  const ice =
    productM !== null
      ? candidates.map((c) => kStatistics([{ a0M: init.a0M, b0M: init.b0M, productM }], c).rows[0])
      : [];
  const flags: QcCode[] = ice.some((r) => !r.feasible) ? ['candidate-impossible'] : [];
  return {
    sampleId: g.sample.sampleId,
    group: g.sample.replicateGroup ?? g.positions[0].position,
    positions: g.positions.map((p) => p.position),
    n,
    absorbance: mean,
    a0M: init.a0M,
    b0M: init.b0M,
    moleFractionB: init.a0M + init.b0M > 0 ? init.b0M / (init.a0M + init.b0M) : 0,
    totalVolumeMl: init.totalVolumeMl,
    productM,
    ice,
    flags,
  };
}

/**
 * Every mixture group: see `mixtureOf`. ε comes from `epsilonSourceOf` (a typed ε, else the
 * standards' calibration, else none, with a warning when there are mixtures). A recipe that cannot be
 * read is a warning and the mixture is left out. The measurements (absorbance less the intercept) are
 * what the uncertainty of K is propagated from.
 *
 * Units: as `mixtureOf`.
 * Reference: as `mixtureOf`; ε source as `epsilon-source.ts`.
 *
 * @example
 * analyseMixtures(replicates.groups, calibration, s).mixtures[0]; // { sampleId: 'J1', a0M: 1.8e-3, b0M: 2e-4, productM: …, ice: […] }
 */
export function analyseMixtures(
  groups: readonly ReplicateGroup[],
  calibration: CalibrationResult | null,
  s: ResolvedAnalysisSettings,
): MixturesStep {
  const candidates = s.candidates.map(parseStoichiometry);
  const epsilonSource = epsilonSourceOf(s, calibration);
  const mixtureGroups = groups.filter((g) => g.sample.role === 'mixture');
  const warnings: string[] =
    mixtureGroups.length > 0 && epsilonSource.epsilonLPerMolCm === null ? [epsilonSource.note] : [];
  const mixtures: MixtureResult[] = [];
  const measurements: MixtureMeasurement[] = [];
  for (const g of mixtureGroups) {
    const recipe = recipeOf(g);
    const init = initialConcentrations(recipe);
    if ('error' in init) {
      warnings.push(`mixture ${g.sample.sampleId}: ${init.error}; not analysed`);
      continue;
    }
    mixtures.push(mixtureOf(g, init, candidates, epsilonSource, s));
    if (g.mean !== null && g.n > 0) {
      measurements.push({
        ...recipe,
        totalVolumeMl: init.totalVolumeMl,
        absorbance: g.mean - epsilonSource.interceptAbsorbance,
        pathLengthCm: s.pathLengthCm,
        replicates: g.n,
      });
    }
  }
  return {
    candidates,
    epsilonSource,
    mixtures,
    usable: mixtures.filter(isUsableMixture),
    measurements,
    warnings,
  };
}
