import { AnalysisError } from './errors';
import { EquilibriumState, equilibriumSensitivity, solveEquilibrium } from './equilibrium-solve';
import { invertSpd } from './linear-algebra';
import { levenbergMarquardt } from './levenberg-marquardt';
import { KStatus, kUnit } from './number-format';
import { kStatusNote } from './k-profile-verdict';
import { profileInterval } from './profile-likelihood';
import { Stoichiometry } from './stoichiometry-model';
import { studentTQuantile } from './student-t';

/** One mixture as the global fit sees it. */
export interface MixturePoint {
  /** Initial A and B after mixing, mol/L. */
  a0M: number;
  b0M: number;
  /** Blank-corrected absorbance of the mixture (only the complex absorbs at this wavelength). */
  absorbance: number;
  pathLengthCm: number;
}

export interface GlobalFitOptions {
  /** Also fit a constant absorbance offset. Default false. */
  fitBaseline?: boolean;
  /**
   * Hold ε at the batch's own value (its standards, another batch, or a typed value), with its standard
   * uncertainty (L·mol⁻¹·cm⁻¹), and fit only K (and the baseline). Default: ε is fitted.
   */
  fixedEpsilon?: {
    value: number;
    se?: number;
    /** SE of a calibration intercept already subtracted from the absorbances, and its covariance with ε. */
    interceptSe?: number;
    covariance?: number;
  };
  /** Starting K (M^(1−a−b)) and ε (L·mol⁻¹·cm⁻¹); a grid search over K chooses them when omitted. */
  startK?: number;
  startEpsilon?: number;
  /** Levenberg–Marquardt limits. Defaults 200 and 1e-11. */
  maxIterations?: number;
  parameterTolerance?: number;
  /** Equilibrium root-finder limits. Defaults 1e-14 and 100. */
  solverTolerance?: number;
  solverMaxIterations?: number;
  /** Compute the profile-likelihood interval of K. Default true (Monte Carlo refits turn it off). */
  profile?: boolean;
}

/** Global fit of one candidate stoichiometry to all mixtures at once. */
export interface GlobalFitResult {
  model: string;
  n: number;
  /** Number of fitted parameters (2, or 3 with a baseline). */
  p: number;
  df: number;
  /** What is known of K: a value with an interval, only a bound, or nothing (with the reason in `message`). */
  status: KStatus;
  /** Unit of K for this stoichiometry, e.g. "L·mol⁻¹". */
  kUnit: string;
  /** Formation constant, M^(1−a−b); null unless K is determined (or poorly determined). */
  k: number | null;
  /** Delta-method SE of K (K·SE(ln K)); null unless determined. */
  kSe: number | null;
  /** 95 % profile-likelihood interval of K (from log₁₀ K); an end is null when the data do not bound it. */
  kCi95: [number | null, number | null] | null;
  /** The quick estimate: exp(ln K ± t·SE(ln K)) from the Jacobian; null unless determined. */
  kCi95Jacobian: [number, number] | null;
  /** One-sided 95 % lower bound when the fit runs to complete binding, else null. */
  kLowerBound95: number | null;
  /** One-sided 95 % upper bound when binding is too weak to see, else null. */
  kUpperBound95: number | null;
  /** True when ε was held at the batch's own value (standards, another batch or typed), not fitted. */
  epsilonFixed: boolean;
  log10K: number | null;
  log10KSe: number | null;
  /** L·mol⁻¹·cm⁻¹. */
  epsilonLPerMolCm: number | null;
  epsilonSe: number | null;
  epsilonCi95: [number, number] | null;
  /** Absorbance offset when fitted, else null. */
  baseline: number | null;
  baselineSe: number | null;
  /** Residual sum of squares (absorbance²) and residual SD (absorbance). */
  rss: number | null;
  residualSd: number | null;
  /** AIC = n·ln(RSS/n) + 2p and its small-sample form AICc = AIC + 2p(p+1)/(n−p−1). */
  aic: number | null;
  aicc: number | null;
  predictedAbsorbance: number[];
  residuals: number[];
  /** Complex concentration per mixture at the fitted K, mol/L. */
  productM: number[];
  converged: boolean;
  iterations: number;
  message: string;
  /** Plain-language notes, e.g. K not identifiable because binding is complete. */
  warnings: string[];
}

const LN10 = Math.log(10);
/** The searched range of the dimensionless K·C^(a+b−1), as log₁₀: from no visible binding to complete binding. */
const LOG10_U_RANGE: [number, number] = [-4, 8];
/** An interval wider than this many decades of K is "poorly determined". */
const POORLY_DETERMINED_DECADES = 1;

/** Keeps the result JSON-clean: an interval with a non-finite end becomes null. */
function finitePair(p: [number, number] | null): [number, number] | null {
  return p && Number.isFinite(p[0]) && Number.isFinite(p[1]) ? p : null;
}

/** Solves every mixture at a given ln K, warm-starting from the last solution; caches the last ln K. */
class MixtureSolver {
  private lastLnK = NaN;
  private last: EquilibriumState[] = [];
  ok = true;

  constructor(
    private readonly points: readonly MixturePoint[],
    private readonly model: Stoichiometry,
    private readonly options: GlobalFitOptions,
  ) {}

  at(lnK: number): EquilibriumState[] {
    if (lnK === this.lastLnK) return this.last;
    const k = Math.exp(lnK);
    const previous = this.last;
    this.last = this.points.map((pt, i) => {
      const s = solveEquilibrium(k, pt.a0M, pt.b0M, this.model, {
        tolerance: this.options.solverTolerance,
        maxIterations: this.options.solverMaxIterations,
        initialGuessM: previous[i]?.productM,
      });
      if (!s.converged) this.ok = false;
      return s;
    });
    this.lastLnK = lnK;
    return this.last;
  }
}

/**
 * Global nonlinear least-squares fit of one stoichiometry to every mixture: the exact equilibrium
 * x_i(K; A₀ᵢ, B₀ᵢ) (closed form for 1:1, bracketed root finder otherwise) predicts
 * A_i = ε·l_i·x_i (+ baseline); Levenberg–Marquardt fits ln K (and ε unless it is held at the batch's
 * own value, and the baseline) with the analytic Jacobian ∂A/∂ln K = ε·l·∂x/∂ln K, ∂A/∂ε = l·x,
 * ∂A/∂baseline = 1. The start comes from a grid over K (ε and baseline solved linearly at each K).
 *
 * What is known of K comes from the profile likelihood on log₁₀ K (ε and baseline re-optimised
 * linearly at each K): a 95 % interval when both sides are bounded ("poorly determined" when it spans
 * more than a decade), a one-sided 95 % lower bound when the fit runs to complete binding (the profile
 * stays flat up to K·C^(a+b−1) = 10⁸), an upper bound when binding is too weak to see, or no number when
 * the fit did not converge. With ε held, the uncertainty of the calibration is propagated into K:
 * u²(ln K) = u²(ln K | ε, b) + g_ε²·u²(ε) + g_b²·u²(b) + 2·g_ε·g_b·u(ε, b), g = ∂ln K/∂(ε, b) to first
 * order at the solution (b the calibration intercept subtracted from the absorbances). The
 * Jacobian interval exp(ln K ± t·SE) is kept as the quick estimate.
 *
 * Units: concentrations mol/L, path length cm, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Hirose K. (2001) J. Incl. Phenom. Macrocycl. Chem. 39, 193 (nonlinear fitting of binding
 * isotherms); Thordarson P. (2011) Chem. Soc. Rev. 40, 1305; Bates D.M. & Watts D.G., Nonlinear
 * Regression Analysis and Its Applications (Wiley, 1988), §6.1 (profile intervals); Akaike H. (1974)
 * IEEE Trans. Autom. Control 19, 716 (AIC); JCGM 100:2008 (GUM) §5.1 (propagation).
 *
 * @param points mixtures with initial concentrations and absorbance
 * @param model candidate stoichiometry
 * @example
 * const m = { a: 1, b: 1, label: '1:1' };
 * const pts = [1e-4, 2e-4, 4e-4, 8e-4].map((b0M) => ({ a0M: 2e-4, b0M, pathLengthCm: 1,
 *   absorbance: 4700 * solveEquilibrium(500, 2e-4, b0M, m).productM }));
 * fitEquilibriumModel(pts, m).k; // 500
 * fitEquilibriumModel(pts, m, { fixedEpsilon: { value: 4700, se: 20 } }).status; // "determined"
 */
export function fitEquilibriumModel(
  points: readonly MixturePoint[],
  model: Stoichiometry,
  options: GlobalFitOptions = {},
): GlobalFitResult {
  const fitBaseline = options.fitBaseline ?? false;
  const fixed = options.fixedEpsilon ?? null;
  if (fixed && !(fixed.value > 0 && Number.isFinite(fixed.value))) {
    throw new AnalysisError('invalid-input', 'a fixed ε must be a positive number');
  }
  const fixedSe = fixed?.se ?? 0;
  const p = (fixed ? 1 : 2) + (fitBaseline ? 1 : 0);
  const n = points.length;
  const unit = kUnit(model.a, model.b);
  const empty = (message: string, status: KStatus = 'not-determined'): GlobalFitResult => ({
    model: model.label,
    n,
    p,
    df: n - p,
    status,
    kUnit: unit,
    k: null,
    kSe: null,
    kCi95: null,
    kCi95Jacobian: null,
    kLowerBound95: null,
    kUpperBound95: null,
    epsilonFixed: fixed !== null,
    log10K: null,
    log10KSe: null,
    epsilonLPerMolCm: fixed?.value ?? null,
    epsilonSe: fixed ? fixedSe : null,
    epsilonCi95: null,
    baseline: null,
    baselineSe: null,
    rss: null,
    residualSd: null,
    aic: null,
    aicc: null,
    predictedAbsorbance: [],
    residuals: [],
    productM: [],
    converged: false,
    iterations: 0,
    message,
    warnings: [message],
  });
  if (n <= p) return empty(`a ${model.label} fit needs more than ${p} mixtures, got ${n}`);
  for (const pt of points) {
    if (![pt.a0M, pt.b0M, pt.absorbance, pt.pathLengthCm].every(Number.isFinite) || !(pt.pathLengthCm > 0)) {
      throw new AnalysisError(
        'invalid-input',
        'every mixture needs finite A₀, B₀, absorbance and a positive path length',
      );
    }
  }
  const y = points.map((pt) => pt.absorbance);
  const l = points.map((pt) => pt.pathLengthCm);

  // Linear parameters (ε unless held, baseline) for a fixed K, by least squares.
  const linearAt = (
    x: readonly number[],
    epsHeld: number | null,
  ): { eps: number; base: number; rss: number } => {
    const z = x.map((xi, i) => xi * l[i]);
    let eps: number;
    let base = 0;
    if (epsHeld !== null) {
      eps = epsHeld;
      if (fitBaseline) base = y.reduce((sum, yi, i) => sum + yi - eps * z[i], 0) / n;
    } else if (fitBaseline) {
      const zm = z.reduce((sum, v) => sum + v, 0) / n;
      const ym = y.reduce((sum, v) => sum + v, 0) / n;
      let szz = 0;
      let szy = 0;
      for (let i = 0; i < n; i++) {
        szz += (z[i] - zm) ** 2;
        szy += (z[i] - zm) * (y[i] - ym);
      }
      eps = szz > 0 ? szy / szz : 0;
      base = ym - eps * zm;
    } else {
      let szz = 0;
      let szy = 0;
      for (let i = 0; i < n; i++) {
        szz += z[i] * z[i];
        szy += z[i] * y[i];
      }
      eps = szz > 0 ? szy / szz : 0;
    }
    let rss = 0;
    for (let i = 0; i < n; i++) rss += (y[i] - eps * z[i] - base) ** 2;
    return { eps, base, rss };
  };

  // ln K ↔ log₁₀ of the dimensionless K·C^(a+b−1), C a typical concentration of the mixtures.
  const scale = points.map((pt) => Math.max(pt.a0M, pt.b0M)).sort((u, v) => u - v)[Math.floor(n / 2)];
  const order = model.a + model.b - 1;
  const lnKOf = (log10u: number): number => log10u * LN10 - order * Math.log(scale);
  const lnKRange: [number, number] = [lnKOf(LOG10_U_RANGE[0]), lnKOf(LOG10_U_RANGE[1])];

  // Starting values: a grid over the dimensionless K.
  const epsilonOf = (q: readonly number[]): number => (fixed ? fixed.value : q[1]);
  const baselineOf = (q: readonly number[]): number => (fitBaseline ? q[fixed ? 1 : 2] : 0);
  let lnK0: number;
  let eps0: number;
  let base0: number;
  const gridSolver = new MixtureSolver(points, model, options);
  if (options.startK !== undefined && (options.startEpsilon !== undefined || fixed)) {
    lnK0 = Math.log(options.startK);
    eps0 = fixed?.value ?? (options.startEpsilon as number);
    base0 = linearAt(
      gridSolver.at(lnK0).map((st) => st.productM),
      eps0,
    ).base;
  } else {
    let best = { rss: Infinity, lnK: 0, eps: 0, base: 0 };
    const steps = 30;
    for (let s = 0; s <= steps; s++) {
      const lnK = lnKOf(-3 + (10 * s) / steps);
      const lin = linearAt(
        gridSolver.at(lnK).map((st) => st.productM),
        fixed?.value ?? null,
      );
      if (lin.rss < best.rss && lin.eps > 0) best = { rss: lin.rss, lnK, eps: lin.eps, base: lin.base };
    }
    if (!Number.isFinite(best.rss))
      return empty(`no positive ε fits the ${model.label} model to these mixtures`);
    lnK0 = options.startK !== undefined ? Math.log(options.startK) : best.lnK;
    eps0 = fixed?.value ?? options.startEpsilon ?? best.eps;
    base0 = best.base;
  }

  const solver = new MixtureSolver(points, model, options);
  const start = [lnK0];
  if (!fixed) start.push(eps0);
  if (fitBaseline) start.push(base0);
  const lm = levenbergMarquardt(
    {
      evaluate: (q) => solver.at(q[0]).map((st, i) => epsilonOf(q) * l[i] * st.productM + baselineOf(q)),
      jacobian: (q) =>
        solver.at(q[0]).map((st, i) => {
          const sens = equilibriumSensitivity(st, model);
          const row = [epsilonOf(q) * l[i] * sens.dProductDLnK];
          if (!fixed) row.push(l[i] * st.productM);
          if (fitBaseline) row.push(1);
          return row;
        }),
    },
    y,
    start,
    { maxIterations: options.maxIterations ?? 200, parameterTolerance: options.parameterTolerance ?? 1e-11 },
  );
  const lmLnK = lm.params[0];
  const lmEps = epsilonOf(lm.params);
  const solverOk = solver.ok;
  const warnings: string[] = [];
  if (!solverOk) warnings.push(`${model.label}: the equilibrium solver did not converge for every mixture`);

  // The profile of the residual sum of squares over ln K, the other parameters re-optimised linearly.
  const profileSolver = new MixtureSolver(points, model, options);
  const profileRss = (lnK: number): number =>
    linearAt(
      profileSolver.at(lnK).map((st) => st.productM),
      fixed?.value ?? null,
    ).rss;
  const lmInRange = Number.isFinite(lmLnK) && lmLnK > lnKRange[0] && lmLnK < lnKRange[1];
  const edgeLow = profileRss(lnKRange[0]);
  const edgeHigh = profileRss(lnKRange[1]);
  // Where the least squares really lie: inside (the LM optimum) or at an edge (K → 0 or K → ∞).
  let lnKHat = lmLnK;
  let rssMin = lm.rss;
  let atEdge: 'low' | 'high' | null = null;
  if (!lmInRange || Math.min(edgeLow, edgeHigh) < lm.rss * (1 - 1e-9)) {
    atEdge = edgeHigh <= edgeLow ? 'high' : 'low';
    lnKHat = atEdge === 'high' ? lnKRange[1] : lnKRange[0];
    rssMin = Math.min(edgeLow, edgeHigh);
  }
  const df = n - p;
  let status: KStatus;
  let kCi95: [number | null, number | null] | null = null;
  let kLowerBound95: number | null = null;
  let kUpperBound95: number | null = null;
  let message = lm.message;
  const wantProfile = options.profile ?? true;
  if (!solverOk) {
    status = 'not-converged';
    message = 'the equilibrium solver did not converge for every mixture';
  } else if (atEdge === null && !lm.converged) {
    status = 'not-converged';
  } else if (!wantProfile) {
    status = atEdge === 'high' ? 'lower-bound' : atEdge === 'low' ? 'upper-bound' : 'determined';
  } else {
    const prof = profileInterval((t) => profileRss(t * LN10), lnKHat / LN10, rssMin, df, {
      range: [lnKRange[0] / LN10, lnKRange[1] / LN10],
    });
    const tenTo = (v: number | null): number | null => (v === null ? null : 10 ** v);
    if (prof.lower95 !== null && prof.upper95 !== null && atEdge === null) {
      kCi95 = [tenTo(prof.lower95), tenTo(prof.upper95)];
      status = prof.upper95 - prof.lower95 > POORLY_DETERMINED_DECADES ? 'poorly-determined' : 'determined';
    } else if (prof.lower95 !== null || (atEdge === 'high' && prof.lowerOneSided95 !== null)) {
      status = 'lower-bound';
      kLowerBound95 = tenTo(prof.lowerOneSided95);
      kCi95 = [tenTo(prof.lower95), null];
      message = 'the fit runs to complete binding: K is too large to determine from these concentrations';
    } else if (prof.upper95 !== null || (atEdge === 'low' && prof.upperOneSided95 !== null)) {
      status = 'upper-bound';
      kUpperBound95 = tenTo(prof.upperOneSided95);
      kCi95 = [null, tenTo(prof.upper95)];
      message = 'binding is too weak to see: K is too small to determine from these concentrations';
    } else {
      status = 'not-determined';
      message = 'these mixtures do not constrain K at all';
    }
  }
  const statusNote = kStatusNote(model.label, status, message);
  if (statusNote) warnings.push(statusNote);

  // The fitted curve at the estimate (for a bound: at the edge of the searched range).
  const finalSolver = new MixtureSolver(points, model, options);
  const finalX = finalSolver.at(lnKHat).map((st) => st.productM);
  const finalLinear =
    atEdge === null ? { eps: lmEps, base: baselineOf(lm.params) } : linearAt(finalX, fixed?.value ?? null);
  const predicted = finalX.map((x, i) => finalLinear.eps * l[i] * x + finalLinear.base);
  const residuals = y.map((yi, i) => yi - predicted[i]);
  const hasValue = status === 'determined' || status === 'poorly-determined';

  // Standard error of ln K: the Jacobian estimate, plus ε's uncertainty when ε is held.
  let lnKSe = hasValue ? lm.standardErrors[0] : null;
  const interceptSe = fixed?.interceptSe ?? 0;
  if (hasValue && fixed && (fixedSe > 0 || interceptSe > 0) && lnKSe !== null) {
    // First order at the solution (Gauss–Newton): δln K = Σ g_i·δy_i, g = row 0 of (JᵀJ)⁻¹Jᵀ. Raising ε
    // by δ acts as δy_i = −l_i·x_i·δ; raising the subtracted intercept b by δ as δy_i = −δ.
    const jac = solver.at(lmLnK).map((st, i) => {
      const row = [fixed.value * l[i] * equilibriumSensitivity(st, model).dProductDLnK];
      if (fitBaseline) row.push(1);
      return row;
    });
    const q = jac[0].length;
    const jtj = Array.from({ length: q }, (_, a) =>
      Array.from({ length: q }, (_, b) => jac.reduce((sum, row) => sum + row[a] * row[b], 0)),
    );
    const inv = invertSpd(jtj);
    const g = inv ? jac.map((row) => row.reduce((sum, v, j) => sum + inv[0][j] * v, 0)) : jac.map(() => NaN);
    const x = solver.at(lmLnK).map((st) => st.productM);
    const gEps = -g.reduce((sum, gi, i) => sum + gi * l[i] * x[i], 0);
    const gB = -g.reduce((sum, gi) => sum + gi, 0);
    const extraVar =
      gEps * gEps * fixedSe * fixedSe +
      gB * gB * interceptSe * interceptSe +
      2 * gEps * gB * (fixed.covariance ?? 0);
    const extra = Math.sqrt(Math.max(0, extraVar));
    if (Number.isFinite(extra)) {
      lnKSe = Math.sqrt(lnKSe * lnKSe + extraVar);
      if (kCi95 && kCi95[0] !== null && kCi95[1] !== null) {
        // Widen each side of the profile interval (log scale) by the calibration's contribution, in quadrature.
        const z = studentTQuantile(0.975, df);
        const hat = lnKHat;
        const lo = hat - Math.sqrt((hat - Math.log(kCi95[0])) ** 2 + (z * extra) ** 2);
        const hi = hat + Math.sqrt((Math.log(kCi95[1]) - hat) ** 2 + (z * extra) ** 2);
        kCi95 = [Math.exp(lo), Math.exp(hi)];
        if ((hi - lo) / LN10 > POORLY_DETERMINED_DECADES) status = 'poorly-determined';
      }
    }
  }
  const t = df > 0 ? studentTQuantile(0.975, df) : null;
  const k = Math.exp(lnKHat);
  const epsSe = fixed ? fixedSe : lm.standardErrors[1];
  const baseSe = fitBaseline ? lm.standardErrors[fixed ? 1 : 2] : null;
  const aic = rssMin > 0 ? n * Math.log(rssMin / n) + 2 * p : null;
  const aicc = aic !== null && n - p - 1 > 0 ? aic + (2 * p * (p + 1)) / (n - p - 1) : null;
  if (!(finalLinear.eps > 0)) warnings.push(`${model.label}: fitted ε is not positive`);
  const residualSd = df > 0 ? Math.sqrt(rssMin / df) : null;
  return {
    model: model.label,
    n,
    p,
    df,
    status,
    kUnit: unit,
    k: hasValue && Number.isFinite(k) ? k : null,
    kSe: hasValue && lnKSe !== null && Number.isFinite(k * lnKSe) ? k * lnKSe : null,
    kCi95,
    kCi95Jacobian: hasValue
      ? finitePair(
          lnKSe !== null && t !== null ? [Math.exp(lnKHat - t * lnKSe), Math.exp(lnKHat + t * lnKSe)] : null,
        )
      : null,
    kLowerBound95,
    kUpperBound95,
    epsilonFixed: fixed !== null,
    log10K: hasValue ? lnKHat / LN10 : null,
    log10KSe: hasValue && lnKSe !== null ? lnKSe / LN10 : null,
    epsilonLPerMolCm: finalLinear.eps,
    epsilonSe: hasValue || fixed ? epsSe : null,
    epsilonCi95: fixed ? null : hasValue ? finitePair(lm.ci95[1]) : null,
    baseline: fitBaseline ? finalLinear.base : null,
    baselineSe: hasValue ? baseSe : null,
    rss: rssMin,
    residualSd,
    aic,
    aicc,
    predictedAbsorbance: predicted,
    residuals,
    productM: finalX,
    converged: status !== 'not-converged',
    iterations: lm.iterations,
    message,
    warnings,
  };
}
