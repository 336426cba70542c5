import { AnalysisError } from './errors';
import { studentTQuantile } from './student-t';

/** A profile-likelihood interval of one parameter θ (other parameters re-optimised at each θ). */
export interface ProfileInterval {
  /** Two-sided 95 % limits; null where the profile stays under the threshold up to the searched range. */
  lower95: number | null;
  upper95: number | null;
  /** One-sided 95 % limits (the two-sided 90 % crossing); null where unbounded. */
  lowerOneSided95: number | null;
  upperOneSided95: number | null;
  /** RSS thresholds used: S_min·(1 + F/df) with F = t² (two-sided 95 %, one-sided 95 %). */
  threshold95: number;
  thresholdOneSided95: number;
  /** Profile evaluations spent. */
  evaluations: number;
}

export interface ProfileOptions {
  /** The range of θ searched; beyond it the data are taken not to bound θ. */
  range: [number, number];
  /** First outward step in θ (doubles each step). Default 0.05. */
  initialStep?: number;
  /** Bisection stops when the bracket is narrower than this. Default 1e-5. */
  tolerance?: number;
  /** Bracketing steps at most, per limit. Default 60. */
  maxBisections?: number;
}

/**
 * Profile-likelihood limits of one parameter θ of a least-squares fit with unknown error variance:
 * θ is inside the 1 − α region when S(θ) ≤ S(θ̂)·(1 + F(1, ν; 1 − α)/ν), S(θ) the residual sum of
 * squares re-minimised over the other parameters and ν = n − p; F(1, ν; 1 − α) = t(1 − α/2, ν)².
 * The one-sided 95 % bounds use the two-sided 90 % threshold, t(0.95, ν)². Each limit is found by
 * stepping outward from θ̂ with doubling steps, then the bracket around each crossing is narrowed by the
 * Illinois method (regula falsi with halving of the stale end); a side whose profile stays below the
 * threshold to the end of `range` is reported as unbounded (null).
 *
 * For a model linear in θ the limits equal θ̂ ± t·SE exactly (used as the check against NIST data).
 *
 * Units: those of θ (here log₁₀ K); S in the squared units of the observations.
 * Reference: Bates D.M. & Watts D.G., Nonlinear Regression Analysis and Its Applications (Wiley, 1988),
 * §6.1 (profile t and likelihood regions); Venzon D.J. & Moolgavkar S.H. (1988) Appl. Stat. 37, 87.
 *
 * @param rssAt S(θ): the residual sum of squares with θ held and the other parameters re-optimised
 * @param thetaHat the best θ
 * @param rssMin S(θ̂) (or the smallest S seen, when the best θ is at the edge of the range)
 * @param df ν = n − p, ≥ 1
 * @throws AnalysisError 'invalid-input' for df < 1, a θ̂ outside the range, or a non-finite S(θ̂)
 * @example
 * // S(θ) = 10 + (θ − 2)²·4 with ν = 10: limits 2 ± √(10·t²/10)/2
 * profileInterval((t) => 10 + 4 * (t - 2) ** 2, 2, 10, 10, { range: [-10, 10] }).upper95; // ≈ 3.114
 */
export function profileInterval(
  rssAt: (theta: number) => number,
  thetaHat: number,
  rssMin: number,
  df: number,
  options: ProfileOptions,
): ProfileInterval {
  const [lo, hi] = options.range;
  if (!(df >= 1))
    throw new AnalysisError('invalid-input', 'a profile interval needs at least one degree of freedom');
  if (!(thetaHat >= lo && thetaHat <= hi))
    throw new AnalysisError('invalid-input', 'θ̂ lies outside the searched range');
  if (!(rssMin >= 0) || !Number.isFinite(rssMin))
    throw new AnalysisError('invalid-input', 'S(θ̂) must be finite');
  const step0 = options.initialStep ?? 0.05;
  const tolerance = options.tolerance ?? 1e-5;
  const maxBisections = options.maxBisections ?? 60;
  const t975 = studentTQuantile(0.975, df);
  const t95 = studentTQuantile(0.95, df);
  let evaluations = 0;
  const cache = new Map<number, number>();
  const s = (theta: number): number => {
    const hit = cache.get(theta);
    if (hit !== undefined) return hit;
    evaluations++;
    const v = rssAt(theta);
    const value = Number.isFinite(v) ? v : Infinity;
    cache.set(theta, value);
    return value;
  };
  // θ̂ is inside by definition: S(θ̂) recomputed here may exceed the given minimum by rounding (a perfect
  // fit has S ≈ 10⁻³⁰), and a floor keeps S = 0 from collapsing the region to a point.
  const base = Math.max(rssMin, s(thetaHat), Number.MIN_VALUE);
  const threshold95 = base * (1 + (t975 * t975) / df);
  const thresholdOneSided95 = base * (1 + (t95 * t95) / df);
  // Steps outward once per side until the profile passes the larger threshold (or the range ends); each
  // limit is then bisected inside the first bracket that crosses its own threshold.
  const scan = (direction: 1 | -1): number[] => {
    const edge = direction > 0 ? hi : lo;
    const visited = [thetaHat];
    let step = step0;
    for (;;) {
      const next = thetaHat + direction * step;
      const at = (direction > 0 ? next >= edge : next <= edge) ? edge : next;
      visited.push(at);
      if (s(at) > threshold95 || at === edge) return visited;
      step *= 2;
    }
  };
  const limit = (visited: readonly number[], threshold: number): number | null => {
    const k = visited.findIndex((theta, i) => i > 0 && s(theta) > threshold);
    if (k < 0) return null;
    // Illinois (modified regula falsi) on S(θ) − threshold: the profile is smooth, so this needs a few
    // evaluations where bisection needs a dozen or more; the bracket always holds the crossing.
    let a = visited[k - 1];
    let b = visited[k];
    let fa = s(a) - threshold;
    let fb = s(b) - threshold;
    if (!Number.isFinite(fb)) fb = Math.max(1, Math.abs(fa)) * 1e6;
    let side = 0;
    for (let i = 0; i < maxBisections && Math.abs(b - a) > tolerance; i++) {
      let c = (a * fb - b * fa) / (fb - fa);
      if (!(c > Math.min(a, b) && c < Math.max(a, b))) c = (a + b) / 2;
      let fc = s(c) - threshold;
      if (!Number.isFinite(fc)) fc = Math.max(1, Math.abs(fa)) * 1e6;
      if (fc > 0) {
        b = c;
        fb = fc;
        if (side === 1) fa /= 2;
        side = 1;
      } else {
        a = c;
        fa = fc;
        if (side === -1) fb /= 2;
        side = -1;
      }
      if (fc === 0) return c;
    }
    return (a + b) / 2;
  };
  const down = scan(-1);
  const up = scan(1);
  return {
    lower95: limit(down, threshold95),
    upper95: limit(up, threshold95),
    lowerOneSided95: limit(down, thresholdOneSided95),
    upperOneSided95: limit(up, thresholdOneSided95),
    threshold95,
    thresholdOneSided95,
    evaluations,
  };
}
