import { iceTable, IceRow } from './ice-table';
import { Stoichiometry } from './stoichiometry-model';

/** Spread of the per-mixture K under one candidate. */
export interface KStatistics {
  model: string;
  rows: IceRow[];
  /** Mixtures where the candidate is possible (both free concentrations > 0). */
  nFeasible: number;
  nInfeasible: number;
  /** Mean, sample SD and CV (= SD/mean, a fraction) of K over the feasible mixtures; null with < 2. */
  kMean: number | null;
  kSd: number | null;
  kCv: number | null;
}

/**
 * Per-mixture K from the ICE table and its mean, SD and coefficient of variation across mixtures:
 * K̄ = ΣK_i/m, s = √(Σ(K_i − K̄)²/(m − 1)), CV = s/K̄. A candidate whose K is constant across
 * mixtures of different composition is consistent with the data.
 *
 * Units: concentrations mol/L, K M^(1−a−b), CV a fraction.
 * Reference: method of "constancy of K" across mixtures, e.g. Harris D.C., Quantitative Chemical
 * Analysis, ch. 17 (spectrophotometric determination of an equilibrium constant).
 *
 * @param mixtures initial concentrations and measured product per mixture, mol/L
 * @example
 * kStatistics([{ a0M: 1e-3, b0M: 1e-4, productM: 8.9e-6 }, { a0M: 1e-3, b0M: 2e-4, productM: 1.78e-5 }],
 *   { a: 1, b: 1, label: '1:1' }).kCv; // small
 */
export function kStatistics(
  mixtures: readonly { a0M: number; b0M: number; productM: number }[],
  model: Stoichiometry,
): KStatistics {
  const rows = mixtures.map((m) => iceTable(m.a0M, m.b0M, m.productM, model));
  const ks = rows.filter((r) => r.k !== null).map((r) => r.k as number);
  const m = ks.length;
  let kMean: number | null = null;
  let kSd: number | null = null;
  if (m >= 1) kMean = ks.reduce((s, v) => s + v, 0) / m;
  if (m >= 2 && kMean !== null) {
    const mean = kMean;
    kSd = Math.sqrt(ks.reduce((s, v) => s + (v - mean) ** 2, 0) / (m - 1));
  }
  return {
    model: model.label,
    rows,
    nFeasible: rows.filter((r) => r.feasible).length,
    nInfeasible: rows.filter((r) => !r.feasible).length,
    kMean,
    kSd,
    kCv: kSd !== null && kMean !== null && kMean > 0 ? kSd / kMean : null,
  };
}
