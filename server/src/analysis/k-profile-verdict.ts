import { KStatus } from './number-format';
import { profileInterval } from './profile-likelihood';

const LN10 = Math.log(10);
/** An interval wider than this many decades of K is "poorly determined" (as in the single-wavelength fit). */
export const POORLY_DETERMINED_DECADES = 1;

/** What the data say about K after a fit over ln K. */
export interface KProfileVerdict {
  status: KStatus;
  /** The estimate of ln K: the optimum, or the edge of the searched range when the fit runs there. */
  lnKHat: number;
  /** S at `lnKHat`. */
  rssMin: number;
  /** Which edge of the range the least squares lie at, if any. */
  atEdge: 'low' | 'high' | null;
  kCi95: [number | null, number | null] | null;
  kLowerBound95: number | null;
  kUpperBound95: number | null;
  message: string;
}

export interface KProfileInput {
  /** S(ln K): the residual sum of squares with K held and every other parameter re-optimised. */
  profileRss: (lnK: number) => number;
  /** The optimiser's answer: ln K, S there, whether it converged and why it stopped. */
  lnK: number;
  rss: number;
  converged: boolean;
  message: string;
  /** False when the equilibrium solver failed somewhere: no number then. */
  solverOk: boolean;
  /** The searched range of ln K (from no visible binding to complete binding). */
  lnKRange: [number, number];
  /** ν = n − p. */
  df: number;
  /** Compute the profile interval. Default true. */
  profile?: boolean;
}

/**
 * Turns a least-squares fit over ln K into what is known of K, with the rules of the single-wavelength
 * global fit: the least squares lie at the optimum or at an edge of the searched range (K → 0 or K → ∞);
 * the 95 % profile-likelihood interval on θ = log₁₀ K, S(θ) ≤ S_min·(1 + F(1, ν; 0.95)/ν), gives
 * `determined` (both ends, within a decade), `poorly-determined` (wider), `lower-bound` (the profile stays
 * flat towards complete binding: a one-sided 95 % lower bound), `upper-bound` (binding too weak to see) or
 * `not-determined`; a failed optimiser or equilibrium solver gives `not-converged`.
 *
 * Units: ln K of K in M^(1−a−b); S in absorbance².
 * Reference: Bates D.M. & Watts D.G., Nonlinear Regression Analysis and Its Applications (Wiley, 1988), §6.1;
 * Venzon D.J. & Moolgavkar S.H. (1988) Appl. Stat. 37, 87.
 *
 * @example
 * // S(ln K) a parabola around ln 500 with ν = 20 (invented)
 * const s = (l: number) => 1 + 40 * (l - Math.log(500)) ** 2;
 * kFromProfile({ profileRss: s, lnK: Math.log(500), rss: 1, converged: true, message: '', solverOk: true,
 *   lnKRange: [-5, 20], df: 20 }).status; // "determined"
 */
export function kFromProfile(input: KProfileInput): KProfileVerdict {
  const { profileRss, lnKRange, df } = input;
  const inRange = Number.isFinite(input.lnK) && input.lnK > lnKRange[0] && input.lnK < lnKRange[1];
  const edgeLow = profileRss(lnKRange[0]);
  const edgeHigh = profileRss(lnKRange[1]);
  let lnKHat = input.lnK;
  let rssMin = input.rss;
  let atEdge: 'low' | 'high' | null = null;
  if (!inRange || Math.min(edgeLow, edgeHigh) < input.rss * (1 - 1e-9)) {
    atEdge = edgeHigh <= edgeLow ? 'high' : 'low';
    lnKHat = atEdge === 'high' ? lnKRange[1] : lnKRange[0];
    rssMin = Math.min(edgeLow, edgeHigh);
  }
  const verdict = (
    status: KStatus,
    message: string,
    extra: Partial<Pick<KProfileVerdict, 'kCi95' | 'kLowerBound95' | 'kUpperBound95'>> = {},
  ): KProfileVerdict => ({
    status,
    lnKHat,
    rssMin,
    atEdge,
    kCi95: null,
    kLowerBound95: null,
    kUpperBound95: null,
    message,
    ...extra,
  });
  if (!input.solverOk)
    return verdict('not-converged', 'the equilibrium solver did not converge for every mixture');
  if (atEdge === null && !input.converged) return verdict('not-converged', input.message);
  if (input.profile === false) {
    const status = atEdge === 'high' ? 'lower-bound' : atEdge === 'low' ? 'upper-bound' : 'determined';
    return verdict(status, input.message);
  }
  const prof = profileInterval((t) => profileRss(t * LN10), lnKHat / LN10, rssMin, df, {
    range: [lnKRange[0] / LN10, lnKRange[1] / LN10],
  });
  const tenTo = (v: number | null): number | null => (v === null ? null : 10 ** v);
  if (prof.lower95 !== null && prof.upper95 !== null && atEdge === null) {
    const wide = prof.upper95 - prof.lower95 > POORLY_DETERMINED_DECADES;
    return verdict(wide ? 'poorly-determined' : 'determined', input.message, {
      kCi95: [tenTo(prof.lower95), tenTo(prof.upper95)],
    });
  }
  if (prof.lower95 !== null || (atEdge === 'high' && prof.lowerOneSided95 !== null)) {
    return verdict(
      'lower-bound',
      'the fit runs to complete binding: K is too large to determine from these concentrations',
      { kLowerBound95: tenTo(prof.lowerOneSided95), kCi95: [tenTo(prof.lower95), null] },
    );
  }
  if (prof.upper95 !== null || (atEdge === 'low' && prof.upperOneSided95 !== null)) {
    return verdict(
      'upper-bound',
      'binding is too weak to see: K is too small to determine from these concentrations',
      { kUpperBound95: tenTo(prof.upperOneSided95), kCi95: [null, tenTo(prof.upper95)] },
    );
  }
  return verdict('not-determined', 'these mixtures do not constrain K at all');
}

/**
 * The note a fit adds for what is known of its K (nothing for a determined K). One wording for the
 * single-wavelength and the whole-spectrum fits.
 *
 * @example
 * kStatusNote('1:2', 'lower-bound', ''); // "1:2: K is too large to determine from these concentrations …"
 */
export function kStatusNote(model: string, status: KStatus, message: string): string | null {
  switch (status) {
    case 'not-converged':
      return `${model}: the fit did not converge (${message})`;
    case 'lower-bound':
      return (
        `${model}: K is too large to determine from these concentrations (binding is complete); ` +
        `redesign the mixtures to measure K — the Planner shows which concentrations would`
      );
    case 'upper-bound':
      return `${model}: K is too small to determine from these concentrations (binding is barely seen)`;
    case 'poorly-determined':
      return `${model}: K is poorly determined (its 95 % interval spans more than a decade)`;
    case 'not-determined':
      return `${model}: ${message}`;
    default:
      return null;
  }
}
