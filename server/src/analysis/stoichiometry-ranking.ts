import { GlobalFitResult } from './global-fit';
import { KStatistics } from './k-statistics';

/** The parts of a fit the ranking reads (a single-wavelength or a whole-spectrum fit). */
export type RankableFit = Pick<GlobalFitResult, 'converged' | 'aic' | 'status' | 'message'>;

/** What the ranking needs to know about one candidate. */
export interface CandidateEvidence {
  model: string;
  kStats: KStatistics | null;
  fit: RankableFit | null;
}

export interface RankingOptions {
  /** ΔAIC below which the two best are called indistinguishable. Default 2 (Burnham & Anderson). */
  ambiguityDeltaAic?: number;
  /** ΔAIC above which a candidate has essentially no support. Default 10 (Burnham & Anderson). */
  ruledOutDeltaAic?: number;
  /** K CV (fraction) above which K "drifts". Default 0.15 (common practice). */
  kCvMax?: number;
}

/** One candidate's place in the ranking. */
export interface RankedCandidate {
  model: string;
  rank: number;
  /** AIC − AIC_best of the global fits; null without a usable fit. */
  deltaAic: number | null;
  /** exp(−Δ/2) / Σ exp(−Δ_j/2). */
  akaikeWeight: number | null;
  ruledOut: boolean;
  /** Plain-language reason, e.g. "its K drifts 45 % across mixtures". */
  reason: string;
}

export interface StoichiometryRanking {
  ranked: RankedCandidate[];
  best: string | null;
  /** True when the two best are statistically indistinguishable. */
  ambiguous: boolean;
  verdict: string;
}

const pct = (v: number): string => `${Math.round(v * 100)} %`;

/**
 * Ranks candidate stoichiometries by the AIC of their global fits (all candidates have the same
 * number of parameters, so this is ranking by residual sum of squares), then by the constancy of
 * the per-mixture K when no fit is usable. ΔAIC < 2 between the two best is "indistinguishable";
 * ΔAIC > 10, a K that drifts more than `kCvMax`, or mixtures where the candidate is impossible rule a
 * candidate out. Akaike weights w_i = exp(−Δ_i/2)/Σ exp(−Δ_j/2).
 *
 * Units: AIC dimensionless; CV a fraction.
 * Reference: Burnham K.P. & Anderson D.R., Model Selection and Multimodel Inference, 2nd ed. (Springer, 2002), §2.6.
 *
 * @example
 * rankStoichiometries(evidence).verdict; // "1:1 fits best; 1:2 is ruled out: its K drifts 45 % across mixtures"
 */
export function rankStoichiometries(
  candidates: readonly CandidateEvidence[],
  options: RankingOptions = {},
): StoichiometryRanking {
  const ambiguityDeltaAic = options.ambiguityDeltaAic ?? 2;
  const ruledOutDeltaAic = options.ruledOutDeltaAic ?? 10;
  const kCvMax = options.kCvMax ?? 0.15;
  if (candidates.length === 0)
    return { ranked: [], best: null, ambiguous: false, verdict: 'No candidates to rank.' };
  // A fit that runs to complete binding (K only bounded), or whose K the data leave open, stays
  // eligible: its residuals still count.
  const usable = (c: CandidateEvidence): number | null =>
    c.fit && c.fit.converged && c.fit.aic !== null ? c.fit.aic : null;
  const bestAic = Math.min(...candidates.map((c) => usable(c) ?? Infinity));
  const sorted = candidates.slice().sort((u, v) => {
    const au = usable(u);
    const av = usable(v);
    if (au !== null && av !== null) return au - av;
    if (au !== null) return -1;
    if (av !== null) return 1;
    const cu = u.kStats?.kCv ?? Infinity;
    const cv = v.kStats?.kCv ?? Infinity;
    return cu - cv;
  });
  const weightSum = candidates.reduce((s, c) => {
    const aic = usable(c);
    return aic !== null ? s + Math.exp(-(aic - bestAic) / 2) : s;
  }, 0);
  const ranked = sorted.map((c, i): RankedCandidate => {
    const aic = usable(c);
    const deltaAic = aic !== null && Number.isFinite(bestAic) ? aic - bestAic : null;
    const reasons: string[] = [];
    const infeasible = c.kStats?.nInfeasible ?? 0;
    if (infeasible > 0) {
      reasons.push(
        `impossible for ${infeasible} of ${c.kStats?.rows.length} mixtures (a reactant would go negative)`,
      );
    }
    // Near complete binding a per-mixture K rests on tiny free concentrations; its scatter says nothing.
    if (c.kStats?.kCv != null && c.kStats.kCv > kCvMax && c.fit?.status !== 'lower-bound')
      reasons.push(`its K drifts ${pct(c.kStats.kCv)} across mixtures`);
    if (deltaAic !== null && deltaAic > ruledOutDeltaAic)
      reasons.push(`its global fit is far worse (ΔAIC ${deltaAic.toFixed(1)})`);
    if (aic === null) {
      if (!c.fit) reasons.push('no global fit');
      else if (!c.fit.converged) reasons.push(`its global fit did not converge (${c.fit.message})`);
      else reasons.push(`its K is not determined (${c.fit.message})`);
    }
    const ruledOut = i > 0 && reasons.length > 0;
    return {
      model: c.model,
      rank: i + 1,
      deltaAic,
      akaikeWeight: aic !== null && weightSum > 0 ? Math.exp(-(aic - bestAic) / 2) / weightSum : null,
      ruledOut,
      reason: reasons.length ? reasons.join('; ') : deltaAic !== null ? `ΔAIC ${deltaAic.toFixed(1)}` : '',
    };
  });
  const best = ranked[0];
  const second = ranked[1];
  const ambiguous =
    second !== undefined &&
    second.deltaAic !== null &&
    second.deltaAic < ambiguityDeltaAic &&
    !second.ruledOut;
  const parts: string[] = [];
  if (ambiguous) {
    parts.push(
      `${best.model} and ${second.model} are statistically indistinguishable (ΔAIC ${second.deltaAic?.toFixed(1)} < ${ambiguityDeltaAic}); ` +
        `mixtures over a wider range of ratios would decide`,
    );
  } else {
    const status = candidates.find((c) => c.model === best.model)?.fit?.status;
    parts.push(
      status === 'lower-bound'
        ? `${best.model} fits best, with K too large to determine from these concentrations (a lower bound only)`
        : `${best.model} fits best`,
    );
  }
  const bestEvidence = candidates.find((c) => c.model === best.model);
  const bestCv = bestEvidence?.kStats?.kCv;
  if (bestCv != null && bestCv > kCvMax && bestEvidence?.fit?.status !== 'lower-bound')
    parts.push(`but even its K varies ${pct(bestCv)} across mixtures`);
  for (const r of ranked.slice(ambiguous ? 2 : 1)) {
    parts.push(
      r.ruledOut ? `${r.model} is ruled out: ${r.reason}` : `${r.model} fits less well (${r.reason})`,
    );
  }
  return { ranked, best: best.model, ambiguous, verdict: parts.join('; ') };
}
