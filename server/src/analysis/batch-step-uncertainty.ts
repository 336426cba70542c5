import { StoichiometryResult, UncertaintyResult } from './batch-types';
import { GlobalFitResult } from './global-fit';
import { MixtureMeasurement } from './mixture-measurement';
import { monteCarloK } from './monte-carlo';
import { ResolvedAnalysisSettings } from './options';
import { parseStoichiometry, Stoichiometry } from './stoichiometry-model';
import { KPropagation, propagateKUncertainty } from './uncertainty-propagation';

/** The propagated uncertainty of the best candidate's K, with what the Monte Carlo step needs. */
export interface BestKPropagation {
  model: string;
  stoichiometry: Stoichiometry;
  fit: GlobalFitResult;
  /** Null when the propagation cannot be computed (as `propagateKUncertainty`). */
  propagation: KPropagation | null;
}

/** The uncertainty step: the uncertainty of the best K (or null) and the Monte Carlo's warnings. */
export interface UncertaintyStep {
  uncertainty: UncertaintyResult | null;
  warnings: string[];
}

/**
 * The uncertainty of the best candidate's K from the uncertainties of the inputs (stocks, volumes,
 * absorbance, path), by the law of propagation of uncertainty with the sensitivities of the fitted K.
 * Only a determined K (a number, not a bound) of a fit that used every usable mixture is propagated;
 * otherwise null.
 *
 * Units: K M^(1−a−b); sd(ln K) dimensionless (the relative standard uncertainty of K).
 * Reference: JCGM 100:2008 (GUM) §5.1.2; Seber G.A.F. & Wild C.J., Nonlinear Regression (1989), §2.1,
 * via `uncertainty-propagation.ts`.
 *
 * @example
 * propagateBestK(stoich.stoichiometry, stoich.fits, mixtures.measurements, mixtures.usable.length, s)?.propagation.lnKSd;
 */
export function propagateBestK(
  stoichiometry: StoichiometryResult | null,
  fits: ReadonlyMap<string, GlobalFitResult>,
  measurements: readonly MixtureMeasurement[],
  usableMixtures: number,
  s: ResolvedAnalysisSettings,
): BestKPropagation | null {
  const model = stoichiometry?.best ?? null;
  const fit = model ? fits.get(model) : undefined;
  if (!model || !fit || fit.status !== 'determined' || fit.k === null) return null;
  if (measurements.length !== usableMixtures) return null;
  const c = parseStoichiometry(model);
  return {
    model,
    stoichiometry: c,
    fit,
    propagation: propagateKUncertainty(measurements, c, fit, s.uncertainty),
  };
}

/**
 * Completes the uncertainty of the best K with a seeded Monte Carlo over the same input uncertainties
 * when the settings ask for draws (a warning counts the refits that did not converge).
 *
 * Units: K M^(1−a−b).
 * Reference: JCGM 101:2008 (GUM Supplement 1), propagation of distributions by a Monte Carlo method,
 * via `monte-carlo.ts`.
 *
 * @example
 * monteCarloBestK(propagated, mixtures.measurements, resolveAnalysisSettings({ monteCarlo: { draws: 2000, seed: 7 } }));
 * // { uncertainty: { model: '1:1', propagation: …, monteCarlo: { kCi95: […], … } }, warnings: [] }
 */
export function monteCarloBestK(
  propagated: BestKPropagation | null,
  measurements: readonly MixtureMeasurement[],
  s: ResolvedAnalysisSettings,
): UncertaintyStep {
  if (!propagated) return { uncertainty: null, warnings: [] };
  const { model, stoichiometry, fit, propagation } = propagated;
  const monteCarlo =
    s.monteCarlo.draws > 0
      ? monteCarloK(measurements, stoichiometry, fit, s.uncertainty, s.monteCarlo.draws, s.monteCarlo.seed)
      : null;
  const warnings =
    monteCarlo && monteCarlo.failed > 0
      ? [`Monte Carlo: ${monteCarlo.failed} of ${monteCarlo.draws} refits did not converge`]
      : [];
  return { uncertainty: { model, propagation, monteCarlo }, warnings };
}
