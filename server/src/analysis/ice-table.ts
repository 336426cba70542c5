import { Stoichiometry } from './stoichiometry-model';

/** One mixture's ICE table under one candidate stoichiometry. */
export interface IceRow {
  model: string;
  /** Equilibrium concentration of the complex (the product), mol/L. */
  productM: number;
  /** Free A = A₀ − a·x, mol/L (may be negative: then `feasible` is false). */
  aFreeM: number;
  bFreeM: number;
  /** K = x/([A]^a·[B]^b), M^(1−a−b); null when infeasible or undefined (a free concentration ≤ 0). */
  k: number | null;
  /** False when a reactant would go negative (or to zero): the candidate is impossible for this mixture. */
  feasible: boolean;
}

/**
 * ICE table (initial, change, equilibrium) for aA + bB ⇌ A_aB_b with measured product x:
 * [A] = A₀ − a·x, [B] = B₀ − b·x, K = x / ([A]^a·[B]^b).
 *
 * Units: concentrations mol/L; K in M^(1−a−b).
 * Reference: law of mass action, e.g. Harris D.C., Quantitative Chemical Analysis, ch. 6.
 *
 * @param a0M initial A, mol/L
 * @param b0M initial B, mol/L
 * @param productM equilibrium complex concentration x = A/(ε·l), mol/L
 * @example
 * iceTable(1e-3, 2e-4, 1.5e-4, { a: 1, b: 1, label: '1:1' }).k; // 1.5e-4/(8.5e-4·5e-5) ≈ 3529 M⁻¹
 */
export function iceTable(a0M: number, b0M: number, productM: number, model: Stoichiometry): IceRow {
  const aFreeM = a0M - model.a * productM;
  const bFreeM = b0M - model.b * productM;
  const feasible = aFreeM > 0 && bFreeM > 0 && productM >= 0;
  const k = feasible ? productM / (aFreeM ** model.a * bFreeM ** model.b) : null;
  return {
    model: model.label,
    productM,
    aFreeM,
    bFreeM,
    k: k !== null && Number.isFinite(k) ? k : null,
    feasible,
  };
}
