import { AnalysisError } from './errors';

/** Stock concentrations and pipetted volumes of one mixture. */
export interface MixtureRecipe {
  /** Stock concentration of reactant A, mol/L. */
  stockAM: number;
  /** Volume of stock A pipetted, mL. */
  volumeAMl: number;
  stockBM: number;
  volumeBMl: number;
  /** Final volume after dilution, mL. When omitted, the sum of the two volumes. */
  totalVolumeMl?: number;
}

/** Initial (analytical) concentrations of a mixture. */
export interface InitialConcentrations {
  /** Reactant A after mixing, mol/L. */
  a0M: number;
  b0M: number;
  totalVolumeMl: number;
}

/**
 * Initial concentrations after mixing by C₁V₁ = C₂V₂: A₀ = c_A·V_A/V_total, B₀ = c_B·V_B/V_total.
 *
 * Units: concentrations mol/L, volumes mL (any common volume unit works; only ratios enter).
 * Reference: conservation of amount of substance (dilution rule, common practice).
 *
 * @throws AnalysisError 'invalid-input' for negative values, a zero total, or a total smaller than the
 *   pipetted volumes.
 * @example
 * mixtureInitialConcentrations({ stockAM: 2e-3, volumeAMl: 2, stockBM: 2e-3, volumeBMl: 3, totalVolumeMl: 10 });
 * // { a0M: 4e-4, b0M: 6e-4, totalVolumeMl: 10 }
 */
export function mixtureInitialConcentrations(recipe: MixtureRecipe): InitialConcentrations {
  const { stockAM, volumeAMl, stockBM, volumeBMl } = recipe;
  const totalVolumeMl = recipe.totalVolumeMl ?? volumeAMl + volumeBMl;
  for (const [name, v] of [
    ['stock A', stockAM],
    ['volume A', volumeAMl],
    ['stock B', stockBM],
    ['volume B', volumeBMl],
  ] as const) {
    if (!(v >= 0) || !Number.isFinite(v))
      throw new AnalysisError('invalid-input', `${name} must be a number ≥ 0`);
  }
  if (!(totalVolumeMl > 0) || !Number.isFinite(totalVolumeMl)) {
    throw new AnalysisError('invalid-input', 'total volume must be positive');
  }
  if (volumeAMl + volumeBMl > totalVolumeMl * (1 + 1e-9)) {
    throw new AnalysisError('invalid-input', 'pipetted volumes exceed the total volume');
  }
  return {
    a0M: (stockAM * volumeAMl) / totalVolumeMl,
    b0M: (stockBM * volumeBMl) / totalVolumeMl,
    totalVolumeMl,
  };
}
