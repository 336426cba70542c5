import { fitLinear } from './linear-regression';

/** Benesi–Hildebrand double-reciprocal estimate of a 1:1 constant. */
export interface BenesiHildebrandResult {
  /** Which reactant is in excess (its initial concentration is taken as its free concentration). */
  excessReactant: 'A' | 'B';
  n: number;
  /** L/mol; null when the line has a non-positive slope or intercept. */
  k: number | null;
  kSe: number | null;
  /** L·mol⁻¹·cm⁻¹ = 1/intercept. */
  epsilonLPerMolCm: number | null;
  slope: number;
  intercept: number;
  r2: number;
}

/**
 * Benesi–Hildebrand linearisation for a 1:1 complex with one reactant in large excess (here B):
 * l·A₀/A = 1/ε + 1/(K·ε·B₀). A straight line of l·A₀/A against 1/B₀ gives ε = 1/intercept and
 * K = intercept/slope; SE(K) by the delta method with cov(b₀, b₁) = −x̄·s²/Sxx.
 * Meant as a cross-check: it weights the dilute points heavily and assumes [B] ≈ B₀.
 *
 * Units: concentrations mol/L, path length cm, K L/mol, ε L·mol⁻¹·cm⁻¹.
 * Reference: Benesi H.A. & Hildebrand J.H. (1949) J. Am. Chem. Soc. 71, 2703.
 *
 * @param points mixtures with B (or A, with `excessReactant: 'A'`) in excess
 * @example
 * benesiHildebrand([1e-2, 2e-2, 4e-2].map((b0M) => ({ a0M: 1e-4, b0M, pathLengthCm: 1,
 *   absorbance: (4700 * 1e-4 * 100 * b0M) / (1 + 100 * b0M) }))).k; // 100
 */
export function benesiHildebrand(
  points: readonly { a0M: number; b0M: number; absorbance: number; pathLengthCm: number }[],
  excessReactant: 'A' | 'B' = 'B',
): BenesiHildebrandResult | null {
  const usable = points.filter((p) => p.absorbance > 0 && p.a0M > 0 && p.b0M > 0);
  if (usable.length < 3) return null;
  const limiting = (p: (typeof usable)[number]): number => (excessReactant === 'B' ? p.a0M : p.b0M);
  const excess = (p: (typeof usable)[number]): number => (excessReactant === 'B' ? p.b0M : p.a0M);
  const x = usable.map((p) => 1 / excess(p));
  const y = usable.map((p) => (p.pathLengthCm * limiting(p)) / p.absorbance);
  let fit;
  try {
    fit = fitLinear(x, y);
  } catch {
    return null;
  }
  const ok = fit.slope > 0 && fit.intercept > 0;
  const k = ok ? fit.intercept / fit.slope : null;
  let kSe: number | null = null;
  if (k !== null && fit.interceptSe !== null && fit.df > 0) {
    const cov = (-fit.xMean * fit.residualSd ** 2) / fit.sxx;
    const rel2 =
      (fit.interceptSe / fit.intercept) ** 2 +
      (fit.slopeSe / fit.slope) ** 2 -
      (2 * cov) / (fit.intercept * fit.slope);
    kSe = rel2 > 0 ? k * Math.sqrt(rel2) : null;
  }
  return {
    excessReactant,
    n: fit.n,
    k,
    kSe,
    epsilonLPerMolCm: fit.intercept > 0 ? 1 / fit.intercept : null,
    slope: fit.slope,
    intercept: fit.intercept,
    r2: fit.r2,
  };
}
