/**
 * Exact equilibrium of A + B ⇌ AB in closed form. With S = A₀ + B₀ + 1/K, the product x solves
 * x² − S·x + A₀B₀ = 0; the physical root, written to avoid cancellation, is
 * x = 2·A₀·B₀ / (S + √D), D = (A₀ − B₀)² + 2(A₀ + B₀)/K + 1/K² (= S² − 4A₀B₀).
 *
 * Units: A₀, B₀ and x in mol/L, K in L/mol.
 * Reference: quadratic mass balance of a 1:1 complex, e.g. Connors K.A., Binding Constants (Wiley, 1987), ch. 2;
 * numerically stable root: Press et al., Numerical Recipes, 3rd ed., §5.6.
 *
 * @param k formation constant, L/mol (Infinity allowed: x = min(A₀, B₀))
 * @param a0M initial A, mol/L
 * @param b0M initial B, mol/L
 * @example
 * solveOneToOne(98, 1e-3, 1e-3); // ≈ 8.2497e-5 mol/L of complex
 */
export function solveOneToOne(k: number, a0M: number, b0M: number): number {
  if (!(a0M > 0) || !(b0M > 0) || !(k > 0)) return 0;
  const invK = 1 / k;
  const s = a0M + b0M + invK;
  const d = (a0M - b0M) ** 2 + 2 * (a0M + b0M) * invK + invK * invK;
  const x = (2 * a0M * b0M) / (s + Math.sqrt(d));
  return Math.min(x, a0M, b0M);
}
