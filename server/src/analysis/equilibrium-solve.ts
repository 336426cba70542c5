import { solveOneToOne } from './equilibrium-one-to-one';
import { findRootBracketed } from './root-finding';
import { Stoichiometry } from './stoichiometry-model';

/** Equilibrium composition of one mixture under one candidate. */
export interface EquilibriumState {
  /** Complex concentration x, mol/L (0 ≤ x ≤ min(A₀/a, B₀/b)). */
  productM: number;
  /** Free A = A₀ − a·x and free B = B₀ − b·x, mol/L (never negative). */
  aFreeM: number;
  bFreeM: number;
  converged: boolean;
  iterations: number;
}

export interface EquilibriumSolveOptions {
  /** 'auto' uses the closed form for 1:1 and the root finder otherwise. Default 'auto'. */
  method?: 'auto' | 'root';
  /** Relative tolerance of the root finder. Default 1e-14. */
  tolerance?: number;
  /** Default 100. */
  maxIterations?: number;
  /** A good first guess of x, mol/L (e.g. the solution at a nearby K); used when inside the physical interval. */
  initialGuessM?: number;
}

/**
 * Solves aA + bB ⇌ A_aB_b for the complex concentration x given K, A₀ and B₀:
 * K = x / ((A₀ − a·x)^a·(B₀ − b·x)^b) with 0 ≤ x ≤ min(A₀/a, B₀/b). Closed form for 1:1; otherwise a
 * safeguarded Newton search on g(x) = ln x − ln K − a·ln(A₀ − a·x) − b·ln(B₀ − b·x), which is strictly
 * increasing on the physical interval, so the root is unique and always stays inside it.
 *
 * Units: concentrations mol/L, K in M^(1−a−b).
 * Reference: law of mass action with mass balance; Connors K.A., Binding Constants (Wiley, 1987), ch. 2.
 *
 * @param k formation constant, M^(1−a−b)
 * @param a0M initial A, mol/L
 * @param b0M initial B, mol/L
 * @param model candidate stoichiometry
 * @example
 * solveEquilibrium(1e6, 1e-3, 2e-3, { a: 1, b: 2, label: '1:2' }).productM; // ≈ 7.3e-4 mol/L
 */
export function solveEquilibrium(
  k: number,
  a0M: number,
  b0M: number,
  model: Stoichiometry,
  options: EquilibriumSolveOptions = {},
): EquilibriumState {
  const { a, b } = model;
  const state = (x: number, converged: boolean, iterations: number): EquilibriumState => ({
    productM: x,
    aFreeM: Math.max(0, a0M - a * x),
    bFreeM: Math.max(0, b0M - b * x),
    converged,
    iterations,
  });
  if (!(a0M > 0) || !(b0M > 0) || !(k > 0)) return state(0, true, 0);
  const xMax = Math.min(a0M / a, b0M / b);
  if (!(xMax > 0)) return state(0, true, 0); // denormal inputs: nothing can form
  if (k === Infinity) return state(xMax, true, 0);
  if (a === 1 && b === 1 && (options.method ?? 'auto') === 'auto') {
    return state(solveOneToOne(k, a0M, b0M), true, 0);
  }
  const lnK = Math.log(k);
  const g = (x: number): [number, number] => {
    const fa = a0M - a * x;
    const fb = b0M - b * x;
    if (!(fa > 0) || !(fb > 0)) return [Infinity, Infinity];
    const value = Math.log(x) - lnK - a * Math.log(fa) - b * Math.log(fb);
    return [value, 1 / x + (a * a) / fa + (b * b) / fb];
  };
  // Weak-binding estimate x ≈ K·A₀^a·B₀^b blended harmonically with the ceiling: inside (0, xMax).
  const xWeak = Math.exp(lnK + a * Math.log(a0M) + b * Math.log(b0M));
  const guess = options.initialGuessM;
  const x0 =
    guess !== undefined && guess > 0 && guess < xMax
      ? guess
      : Number.isFinite(xWeak)
        ? (xWeak * xMax) / (xWeak + xMax)
        : 0.5 * xMax;
  const r = findRootBracketed(g, 0, xMax, x0, {
    tolerance: options.tolerance ?? 1e-14,
    maxIterations: options.maxIterations ?? 100,
  });
  return state(Math.min(Math.max(r.root, 0), xMax), r.converged, r.iterations);
}

/** Derivatives of the complex concentration x at equilibrium (implicit function theorem). */
export interface EquilibriumSensitivity {
  /** ∂x/∂ln K, mol/L. */
  dProductDLnK: number;
  /** ∂x/∂A₀ and ∂x/∂B₀, dimensionless. */
  dProductDA0: number;
  dProductDB0: number;
}

/**
 * Sensitivities of x from implicit differentiation of g(x) = ln x − ln K − a·ln[A] − b·ln[B] = 0:
 * with g′ = 1/x + a²/[A] + b²/[B], ∂x/∂ln K = 1/g′, ∂x/∂A₀ = (a/[A])/g′, ∂x/∂B₀ = (b/[B])/g′.
 *
 * Units: x, [A], [B] in mol/L. Reference: implicit function theorem applied to the mass-action law.
 *
 * @example
 * const s = solveEquilibrium(98, 1e-3, 1e-3, { a: 1, b: 1, label: '1:1' });
 * equilibriumSensitivity(s, { a: 1, b: 1, label: '1:1' }).dProductDLnK; // ≈ 7.6e-5 mol/L
 */
export function equilibriumSensitivity(
  state: EquilibriumState,
  model: Stoichiometry,
): EquilibriumSensitivity {
  const { productM: x, aFreeM: fa, bFreeM: fb } = state;
  const { a, b } = model;
  if (!(x > 0)) return { dProductDLnK: 0, dProductDA0: 0, dProductDB0: 0 };
  // Multiplied-through forms stay finite when a free concentration reaches 0 (complete binding).
  const denom = fa * fb + a * a * x * fb + b * b * x * fa;
  return {
    dProductDLnK: denom > 0 ? (x * fa * fb) / denom : 0,
    dProductDA0: a / (fa / x + a * a + (fa > 0 ? (b * b * fa) / fb : 0)),
    dProductDB0: b / (fb / x + b * b + (fb > 0 ? (a * a * fb) / fa : 0)),
  };
}
