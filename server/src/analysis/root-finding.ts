import { AnalysisError } from './errors';

/** Result of a bracketed root search. */
export interface RootResult {
  root: number;
  iterations: number;
  converged: boolean;
}

export interface RootOptions {
  /** Relative tolerance on the root. Default 1e-14. */
  tolerance?: number;
  /** Default 100. */
  maxIterations?: number;
}

/**
 * Safeguarded Newton–Raphson inside a bracket [lo, hi] on which f is increasing and changes sign:
 * each Newton step x ← x − f/f′ that would leave the shrinking bracket is replaced by bisection.
 * Stops when |Δx| ≤ tol·|x| or the bracket is narrower than tol·|hi|; reports `converged: false`
 * (never a silent guess) after `maxIterations`.
 *
 * Units: those of x. Reference: Press et al., Numerical Recipes, 3rd ed., §9.4 (rtsafe).
 *
 * @param f function returning [f(x), f′(x)]
 * @param lo lower end (f(lo) < 0 or f → −∞ there)
 * @param hi upper end (f(hi) > 0 or f → +∞ there)
 * @param x0 starting point strictly inside (lo, hi)
 * @example
 * findRootBracketed((x) => [x * x - 2, 2 * x], 0, 2, 1).root; // 1.41421356237…
 */
export function findRootBracketed(
  f: (x: number) => [number, number],
  lo: number,
  hi: number,
  x0: number,
  options: RootOptions = {},
): RootResult {
  const tol = options.tolerance ?? 1e-14;
  const maxIterations = options.maxIterations ?? 100;
  if (!(hi > lo)) throw new AnalysisError('invalid-input', 'root bracket is empty');
  let x = x0 > lo && x0 < hi ? x0 : 0.5 * (lo + hi);
  for (let i = 1; i <= maxIterations; i++) {
    const [fx, dfx] = f(x);
    if (fx === 0) return { root: x, iterations: i, converged: true };
    if (fx < 0) lo = x;
    else hi = x;
    let next = x - fx / dfx;
    if (!(next > lo && next < hi)) {
      // Bisect geometrically when the bracket spans decades, and step down by decades while the lower end
      // is still 0: roots near 0 (weak binding) are then reached in a few dozen steps at most.
      next =
        lo > 0 && hi / lo > 4
          ? Math.sqrt(lo * hi)
          : lo === 0 && hi > 0 && fx > 0
            ? hi * 1e-3
            : 0.5 * (lo + hi);
    }
    if (Math.abs(next - x) <= tol * Math.abs(next) || hi - lo <= tol * Math.abs(hi)) {
      return { root: next, iterations: i, converged: true };
    }
    x = next;
  }
  return { root: x, iterations: maxIterations, converged: false };
}
