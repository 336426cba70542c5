import { AnalysisError } from './errors';
import { EquilibriumState, equilibriumSensitivity, solveEquilibrium } from './equilibrium-solve';
import { levenbergMarquardt } from './levenberg-marquardt';
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
  /** Starting K (M^(1−a−b)) and ε (L·mol⁻¹·cm⁻¹); a grid search over K chooses them when omitted. */
  startK?: number;
  startEpsilon?: number;
  /** Levenberg–Marquardt limits. Defaults 200 and 1e-11. */
  maxIterations?: number;
  parameterTolerance?: number;
  /** Equilibrium root-finder limits. Defaults 1e-14 and 100. */
  solverTolerance?: number;
  solverMaxIterations?: number;
}

/** Global fit of one candidate stoichiometry to all mixtures at once. */
export interface GlobalFitResult {
  model: string;
  n: number;
  /** Number of fitted parameters (2, or 3 with a baseline). */
  p: number;
  df: number;
  /** Formation constant, M^(1−a−b); null when the fit failed. */
  k: number | null;
  /** Delta-method SE of K (K·SE(ln K)). */
  kSe: number | null;
  /** exp(ln K ± t·SE(ln K)): asymmetric, always positive. */
  kCi95: [number, number] | null;
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
 * A_i = ε·l_i·x_i (+ baseline); Levenberg–Marquardt fits ln K and ε (and the baseline) with the
 * analytic Jacobian ∂A/∂ln K = ε·l·∂x/∂ln K, ∂A/∂ε = l·x, ∂A/∂baseline = 1. The start comes from a
 * grid over K (ε and baseline solved linearly at each K). SEs and 95 % intervals come from
 * s²·(JᵀJ)⁻¹; K's interval is exp(ln K ± t·SE).
 *
 * Units: concentrations mol/L, path length cm, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Hirose K. (2001) J. Incl. Phenom. Macrocycl. Chem. 39, 193 (nonlinear fitting of binding
 * isotherms); Thordarson P. (2011) Chem. Soc. Rev. 40, 1305; Akaike H. (1974) IEEE Trans. Autom.
 * Control 19, 716 (AIC).
 *
 * @param points mixtures with initial concentrations and absorbance
 * @param model candidate stoichiometry
 * @example
 * const m = { a: 1, b: 1, label: '1:1' };
 * const pts = [1e-4, 2e-4, 4e-4, 8e-4].map((b0M) => ({ a0M: 2e-4, b0M, pathLengthCm: 1,
 *   absorbance: 4700 * solveEquilibrium(500, 2e-4, b0M, m).productM }));
 * fitEquilibriumModel(pts, m).k; // 500
 */
export function fitEquilibriumModel(
  points: readonly MixturePoint[],
  model: Stoichiometry,
  options: GlobalFitOptions = {},
): GlobalFitResult {
  const fitBaseline = options.fitBaseline ?? false;
  const p = fitBaseline ? 3 : 2;
  const n = points.length;
  const empty = (message: string): GlobalFitResult => ({
    model: model.label,
    n,
    p,
    df: n - p,
    k: null,
    kSe: null,
    kCi95: null,
    log10K: null,
    log10KSe: null,
    epsilonLPerMolCm: null,
    epsilonSe: null,
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

  // Linear parameters (ε, baseline) for a fixed K, by least squares.
  const linearAt = (x: readonly number[]): { eps: number; base: number; rss: number } => {
    const z = x.map((xi, i) => xi * l[i]);
    let eps: number;
    let base = 0;
    if (fitBaseline) {
      const zm = z.reduce((s, v) => s + v, 0) / n;
      const ym = y.reduce((s, v) => s + v, 0) / n;
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

  // Starting values: grid over the dimensionless K·C^(a+b−1), C a typical concentration.
  const scale = points.map((pt) => Math.max(pt.a0M, pt.b0M)).sort((u, v) => u - v)[Math.floor(n / 2)];
  const order = model.a + model.b - 1;
  let lnK0: number;
  let eps0: number;
  let base0 = 0;
  let gridEdge = false;
  if (options.startK !== undefined && options.startEpsilon !== undefined) {
    lnK0 = Math.log(options.startK);
    eps0 = options.startEpsilon;
  } else {
    let best = { rss: Infinity, lnK: 0, eps: 0, base: 0, index: 0 };
    const steps = 30;
    const gridSolver = new MixtureSolver(points, model, options);
    for (let s = 0; s <= steps; s++) {
      const log10u = -3 + (10 * s) / steps;
      const lnK = log10u * LN10 - order * Math.log(scale);
      const x = gridSolver.at(lnK).map((st) => st.productM);
      const lin = linearAt(x);
      if (lin.rss < best.rss && lin.eps > 0)
        best = { rss: lin.rss, lnK, eps: lin.eps, base: lin.base, index: s };
    }
    if (!Number.isFinite(best.rss))
      return empty(`no positive ε fits the ${model.label} model to these mixtures`);
    gridEdge = best.index === 0 || best.index === steps;
    lnK0 = options.startK !== undefined ? Math.log(options.startK) : best.lnK;
    eps0 = options.startEpsilon ?? best.eps;
    base0 = best.base;
  }

  const solver = new MixtureSolver(points, model, options);
  const lm = levenbergMarquardt(
    {
      evaluate: (q) => solver.at(q[0]).map((st, i) => q[1] * l[i] * st.productM + (fitBaseline ? q[2] : 0)),
      jacobian: (q) => {
        const states = solver.at(q[0]);
        return states.map((s, i) => {
          const sens = equilibriumSensitivity(s, model);
          const row = [q[1] * l[i] * sens.dProductDLnK, l[i] * s.productM];
          if (fitBaseline) row.push(1);
          return row;
        });
      },
    },
    y,
    fitBaseline ? [lnK0, eps0, base0] : [lnK0, eps0],
    { maxIterations: options.maxIterations ?? 200, parameterTolerance: options.parameterTolerance ?? 1e-11 },
  );
  const [lnK, eps] = lm.params;
  const solverOk = solver.ok;
  const finalSolver = new MixtureSolver(points, model, options);
  const final = { x: finalSolver.at(lnK).map((st) => st.productM), ok: finalSolver.ok };
  const warnings: string[] = [];
  if (!lm.converged) warnings.push(`${model.label}: the fit did not converge (${lm.message})`);
  if (!solverOk || !final.ok)
    warnings.push(`${model.label}: the equilibrium solver did not converge for every mixture`);
  const lnKSe = lm.standardErrors[0];
  const t = lm.df > 0 ? studentTQuantile(0.975, lm.df) : null;
  const k = Math.exp(lnK);
  if (gridEdge || lnKSe === null || lnKSe > 2 * LN10) {
    warnings.push(
      `${model.label}: K is poorly determined by these mixtures (binding too complete or too weak for the concentrations used)`,
    );
  }
  if (!(eps > 0)) warnings.push(`${model.label}: fitted ε is not positive`);
  const epsSe = lm.standardErrors[1];
  const baseSe = fitBaseline ? lm.standardErrors[2] : null;
  const rss = lm.rss;
  const aic = rss > 0 ? n * Math.log(rss / n) + 2 * p : null;
  const aicc = aic !== null && n - p - 1 > 0 ? aic + (2 * p * (p + 1)) / (n - p - 1) : null;
  const converged = lm.converged && solverOk && final.ok;
  return {
    model: model.label,
    n,
    p,
    df: lm.df,
    k: Number.isFinite(k) ? k : null,
    kSe: lnKSe !== null && Number.isFinite(k * lnKSe) ? k * lnKSe : null,
    kCi95: finitePair(
      lnKSe !== null && t !== null ? [Math.exp(lnK - t * lnKSe), Math.exp(lnK + t * lnKSe)] : null,
    ),
    log10K: lnK / LN10,
    log10KSe: lnKSe !== null ? lnKSe / LN10 : null,
    epsilonLPerMolCm: eps,
    epsilonSe: epsSe,
    epsilonCi95: finitePair(lm.ci95[1]),
    baseline: fitBaseline ? lm.params[2] : null,
    baselineSe: baseSe,
    rss,
    residualSd: lm.residualSd,
    aic,
    aicc,
    predictedAbsorbance: lm.fitted,
    residuals: lm.residuals,
    productM: final.x,
    converged,
    iterations: lm.iterations,
    message: lm.message,
    warnings,
  };
}
