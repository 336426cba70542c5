import { AnalysisError } from './errors';
import { fitEquilibriumModel, GlobalFitResult, MixturePoint } from './global-fit';
import { InputUncertainties, isMadeUpToVolume, MixtureMeasurement } from './mixture-measurement';
import { seededRandom } from './random';
import { Stoichiometry } from './stoichiometry-model';

/** Monte Carlo distribution of a globally fitted K. */
export interface KMonteCarlo {
  model: string;
  draws: number;
  seed: number;
  /** Draws whose refit did not converge (left out of the statistics, and counted here). */
  failed: number;
  /** Median K and the 2.5 %–97.5 % percentile interval, M^(1−a−b). */
  kMedian: number;
  kCi95: [number, number];
  /** SD of ln K over the draws (relative uncertainty of K). */
  lnKSd: number;
  absorbanceSdUsed: number;
}

function percentile(sorted: readonly number[], q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.ceil(h);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Seeded Monte Carlo propagation: each draw perturbs every stock concentration (one normal draw per
 * distinct stock), every pipetted volume and made-up total (relative normal errors), and every
 * absorbance (normal, SD/√replicates), recomputes A₀ = c_A·V_A/V_T and B₀, refits K (warm start at
 * the original fit) and collects K. The interval is the 2.5 and 97.5 percentiles (Hyndman–Fan type 7).
 * Draws whose refit fails are counted in `failed`, never silently replaced.
 *
 * Units: volumes mL, concentrations mol/L, relative SDs fractions.
 * Reference: JCGM 101:2008 (GUM Supplement 1), propagation of distributions by a Monte Carlo method.
 *
 * @param mixtures recipes and absorbances
 * @param model candidate
 * @param fit converged global fit of the same mixtures (gives the warm start)
 * @param u input uncertainties
 * @param draws number of draws (e.g. 2000)
 * @param seed integer seed: the same seed gives the same interval
 * @example
 * monteCarloK(mixtures, parseStoichiometry('1:1'), fit, u, 2000, 7).kCi95; // [lo, hi]
 */
export function monteCarloK(
  mixtures: readonly MixtureMeasurement[],
  model: Stoichiometry,
  fit: GlobalFitResult,
  u: InputUncertainties,
  draws: number,
  seed: number,
): KMonteCarlo | null {
  if (fit.k === null || fit.epsilonLPerMolCm === null || !fit.converged) return null;
  if (!(draws >= 10) || !Number.isInteger(draws)) {
    throw new AnalysisError('invalid-settings', 'Monte Carlo needs an integer number of draws ≥ 10');
  }
  const rng = seededRandom(seed);
  const absorbanceSd = u.absorbanceSd ?? fit.residualSd ?? 0;
  const stocksA = [...new Set(mixtures.map((m) => m.stockAM))];
  const stocksB = [...new Set(mixtures.map((m) => m.stockBM))];
  const fitBaseline = fit.baseline !== null;
  const lnKs: number[] = [];
  let failed = 0;
  for (let d = 0; d < draws; d++) {
    const fa = new Map(stocksA.map((s) => [s, 1 + u.stockRelSd * rng.normal()]));
    const fb = new Map(stocksB.map((s) => [s, 1 + u.stockRelSd * rng.normal()]));
    const points: MixturePoint[] = mixtures.map((m) => {
      const va = m.volumeAMl * (1 + u.pipetteRelSd * rng.normal());
      const vb = m.volumeBMl * (1 + u.pipetteRelSd * rng.normal());
      const vt = isMadeUpToVolume(m)
        ? (m.totalVolumeMl as number) * (1 + u.flaskRelSd * rng.normal())
        : va + vb;
      return {
        a0M: (m.stockAM * (fa.get(m.stockAM) as number) * va) / vt,
        b0M: (m.stockBM * (fb.get(m.stockBM) as number) * vb) / vt,
        absorbance: m.absorbance + (absorbanceSd / Math.sqrt(m.replicates ?? 1)) * rng.normal(),
        pathLengthCm: m.pathLengthCm,
      };
    });
    // A held ε is one more input, drawn once per refit from its own uncertainty.
    const heldEpsilon = fit.epsilonFixed
      ? { value: (fit.epsilonLPerMolCm as number) + (fit.epsilonSe ?? 0) * rng.normal() }
      : undefined;
    const r = fitEquilibriumModel(points, model, {
      fitBaseline,
      fixedEpsilon: heldEpsilon && heldEpsilon.value > 0 ? heldEpsilon : undefined,
      startK: fit.k,
      startEpsilon: fit.epsilonLPerMolCm,
      maxIterations: 100,
      parameterTolerance: 1e-8,
      profile: false,
    });
    if (r.status === 'determined' && r.log10K !== null && Number.isFinite(r.log10K))
      lnKs.push(r.log10K * Math.LN10);
    else failed++;
  }
  if (lnKs.length < 2) return null;
  const sorted = lnKs.slice().sort((x, y) => x - y);
  const mean = lnKs.reduce((s, v) => s + v, 0) / lnKs.length;
  const sd = Math.sqrt(lnKs.reduce((s, v) => s + (v - mean) ** 2, 0) / (lnKs.length - 1));
  return {
    model: model.label,
    draws,
    seed,
    failed,
    kMedian: Math.exp(percentile(sorted, 0.5)),
    kCi95: [Math.exp(percentile(sorted, 0.025)), Math.exp(percentile(sorted, 0.975))],
    lnKSd: sd,
    absorbanceSdUsed: absorbanceSd,
  };
}
