import { UsableMixture } from './batch-step-mixtures';
import { CandidateResult, EpsilonSource, StoichiometryResult } from './batch-types';
import { fitEquilibriumModel, GlobalFitOptions, GlobalFitResult } from './global-fit';
import { kStatistics, KStatistics } from './k-statistics';
import { kUnit } from './number-format';
import { ResolvedAnalysisSettings } from './options';
import { Stoichiometry } from './stoichiometry-model';
import { rankStoichiometries } from './stoichiometry-ranking';
import { crossCheckNotes } from './stoichiometry-cross-checks';

/** The stoichiometry step: the ranked candidates and the headline fit of each. */
export interface StoichiometryStep {
  /** Null when no mixture is usable. */
  stoichiometry: StoichiometryResult | null;
  /** Each candidate's headline fit (ε held when the batch has an ε source), by label. */
  fits: ReadonlyMap<string, GlobalFitResult>;
  /** The top-ranked candidate's fit notes, which become batch warnings. */
  warnings: string[];
}

/** What one candidate brings to the ranking. */
export interface CandidateEvidenceOf {
  model: string;
  stoichiometry: Stoichiometry;
  /** Per-mixture K, its mean, SD and CV; null without ε. */
  kStats: KStatistics | null;
  /** The headline fit. */
  fit: GlobalFitResult;
  /** With ε held: the fit with ε free as well (the cross-check); else null. */
  freeFit: GlobalFitResult | null;
}

/**
 * One candidate's evidence: K per mixture (when ε is known) and the global fit of all mixtures. The
 * headline fit follows the batch's ε source: with ε known it is held at that value (its standard error,
 * the intercept's and their covariance carried into the interval of K), and the free-ε fit is kept as the
 * cross-check; without ε, ε is fitted and there is no cross-check.
 *
 * Units: concentrations mol/L, path cm, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Hirose K. (2001) J. Incl. Phenom. Macrocycl. Chem. 39, 193 (global nonlinear fit of
 * binding data), via `global-fit.ts`.
 */
export function candidateEvidence(
  usable: readonly UsableMixture[],
  c: Stoichiometry,
  epsilonSource: EpsilonSource,
  s: ResolvedAnalysisSettings,
): CandidateEvidenceOf {
  const epsilon = epsilonSource.epsilonLPerMolCm;
  const points = usable.map((m) => ({
    a0M: m.a0M,
    b0M: m.b0M,
    absorbance: m.absorbance - epsilonSource.interceptAbsorbance,
    pathLengthCm: s.pathLengthCm,
  }));
  const fitOptions: GlobalFitOptions = {
    fitBaseline: s.fitBaseline,
    maxIterations: s.fit.maxIterations,
    parameterTolerance: s.fit.parameterTolerance,
    solverTolerance: s.solver.tolerance,
    solverMaxIterations: s.solver.maxIterations,
  };
  // With ε known every usable mixture has a product concentration.
  const products = usable.flatMap((m) =>
    m.productM === null ? [] : [{ a0M: m.a0M, b0M: m.b0M, productM: m.productM }],
  );
  const kStats = epsilon !== null ? kStatistics(products, c) : null;
  const freeFit = fitEquilibriumModel(points, c, fitOptions);
  const fit =
    epsilon !== null
      ? fitEquilibriumModel(points, c, {
          ...fitOptions,
          fixedEpsilon: {
            value: epsilon,
            se: epsilonSource.epsilonSe ?? 0,
            interceptSe: epsilonSource.interceptSe,
            covariance: epsilonSource.epsilonInterceptCov,
          },
        })
      : freeFit;
  return { model: c.label, stoichiometry: c, kStats, fit, freeFit: fit === freeFit ? null : freeFit };
}

/**
 * Stoichiometry: every candidate's evidence (see `candidateEvidence`), ranked by AIC with Akaike
 * weights, the candidates a reactant would go negative for or whose K is far from constant ruled out,
 * and a verdict in words. Each candidate keeps its own fit notes (with the held/free cross-check).
 *
 * Units: K M^(1−a−b) (the unit is given per candidate); ΔAIC dimensionless.
 * Reference: Burnham K.P. & Anderson D.R., Model Selection and Multimodel Inference, 2nd ed. (2002),
 * §2.6, via `stoichiometry-ranking.ts`.
 *
 * @example
 * rankCandidates(mixtures.usable, mixtures.candidates, mixtures.epsilonSource, s).stoichiometry?.best; // "1:1"
 */
export function rankCandidates(
  usable: readonly UsableMixture[],
  candidates: readonly Stoichiometry[],
  epsilonSource: EpsilonSource,
  s: ResolvedAnalysisSettings,
): StoichiometryStep {
  if (usable.length === 0) return { stoichiometry: null, fits: new Map(), warnings: [] };
  const evidence = candidates.map((c) => candidateEvidence(usable, c, epsilonSource, s));
  const fits = new Map(evidence.map((e) => [e.model, e.fit]));
  const ranking = rankStoichiometries(evidence, {
    ambiguityDeltaAic: s.ambiguityDeltaAic,
    ruledOutDeltaAic: s.ruledOutDeltaAic,
    kCvMax: s.kCvMax,
  });
  const byModel = new Map(evidence.map((e) => [e.model, e]));
  const ranked = ranking.ranked.map((r): CandidateResult => {
    const e = byModel.get(r.model);
    if (!e) throw new Error(`the ranking returned ${r.model}, which is not a candidate`);
    const c = e.stoichiometry;
    return {
      model: r.model,
      a: c.a,
      b: c.b,
      kUnit: kUnit(c.a, c.b),
      kMean: e.kStats?.kMean ?? null,
      kSd: e.kStats?.kSd ?? null,
      kCv: e.kStats?.kCv ?? null,
      nFeasible: e.kStats?.nFeasible ?? 0,
      nInfeasible: e.kStats?.nInfeasible ?? 0,
      fit: e.fit,
      freeFit: e.freeFit,
      warnings: [...e.fit.warnings, ...(e.freeFit ? crossCheckNotes(e.fit, e.freeFit) : [])],
      rank: r.rank,
      deltaAic: r.deltaAic,
      akaikeWeight: r.akaikeWeight,
      ruledOut: r.ruledOut,
      reason: r.reason,
    };
  });
  return {
    stoichiometry: {
      candidates: ranked,
      best: ranking.best,
      ambiguous: ranking.ambiguous,
      verdict: ranking.verdict,
    },
    fits,
    warnings: ranked.filter((c) => c.rank === 1).flatMap((c) => c.warnings),
  };
}
