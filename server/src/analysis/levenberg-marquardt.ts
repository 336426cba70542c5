import { AnalysisError } from './errors';
import { cholesky, choleskySolve, invertSpd } from './linear-algebra';
import { studentTQuantile } from './student-t';

/** A model for least squares: predictions (and optionally their Jacobian) at given parameters. */
export interface LeastSquaresModel {
  /** Predicted value per observation. May return non-finite values for forbidden parameters. */
  evaluate(params: readonly number[]): number[];
  /** ∂f_i/∂p_j, n × p. When absent, central differences are used. */
  jacobian?(params: readonly number[]): number[][];
}

export interface LevenbergMarquardtOptions {
  /** Default 500. */
  maxIterations?: number;
  /** Stop when every relative parameter change is below this. Default 1e-11. */
  parameterTolerance?: number;
  /** Stop when the actual and predicted relative decrease of the RSS are below this. Default 1e-15. */
  costTolerance?: number;
  /**
   * Stop when the scaled gradient max_j |Jⱼᵀr|/√(JⱼᵀJⱼ·RSS) (cosine between residual and a Jacobian column)
   * is below this. Default 1e-10: the parameters are then within about 1e-10 standard errors of the optimum.
   */
  gradientTolerance?: number;
  /** Initial damping λ relative to the Marquardt scaling diag(JᵀJ). Default 1e-3. */
  initialDamping?: number;
  /** Observation weights (1/σ²), default all 1. */
  weights?: readonly number[];
}

/** Outcome of a Levenberg–Marquardt fit. */
export interface LevenbergMarquardtResult {
  params: number[];
  /** √diag(s²·(JᵀWJ)⁻¹); null entries when JᵀWJ is singular at the solution. */
  standardErrors: (number | null)[];
  /** s²·(JᵀWJ)⁻¹, or null when singular. */
  covariance: number[][] | null;
  /** p ± t(0.975, n − p)·SE, or null. */
  ci95: ([number, number] | null)[];
  /** Weighted residual sum of squares. */
  rss: number;
  /** √(RSS/(n − p)); null when n = p. */
  residualSd: number | null;
  n: number;
  df: number;
  residuals: number[];
  fitted: number[];
  iterations: number;
  converged: boolean;
  /** Why the iteration stopped. */
  message: string;
}

function finite(v: readonly number[]): boolean {
  for (const x of v) if (!Number.isFinite(x)) return false;
  return true;
}

function numericJacobian(model: LeastSquaresModel, p: readonly number[], f0: readonly number[]): number[][] {
  const n = f0.length;
  const jac: number[][] = Array.from({ length: n }, () => new Array<number>(p.length).fill(0));
  for (let j = 0; j < p.length; j++) {
    // Central differences with step ∝ ε^(1/3) (Nocedal & Wright, Numerical Optimization, §8.1).
    const h = 6e-6 * (Math.abs(p[j]) > 0 ? Math.abs(p[j]) : 1);
    const up = p.slice();
    const down = p.slice();
    up[j] += h;
    down[j] -= h;
    const fu = model.evaluate(up);
    const fd = model.evaluate(down);
    for (let i = 0; i < n; i++) jac[i][j] = (fu[i] - fd[i]) / (2 * h);
  }
  return jac;
}

/**
 * Levenberg–Marquardt nonlinear least squares: minimises Σ w_i·(y_i − f_i(p))² by solving
 * (JᵀWJ + λ·diag(JᵀWJ))·δ = JᵀW·r at each step, with Nielsen's damping update
 * (λ ← λ·max(⅓, 1 − (2ρ − 1)³) on success, λ ← λ·ν, ν ← 2ν on failure). Standard errors from
 * s²·(JᵀWJ)⁻¹ at the solution, s² = RSS/(n − p); 95 % intervals with Student's t.
 * Every run has a maximum number of iterations and reports `converged` and why it stopped.
 *
 * Units: those of the observations and parameters.
 * Reference: Marquardt D.W. (1963) SIAM J. Appl. Math. 11, 431; Madsen, Nielsen & Tingleff,
 * "Methods for Non-Linear Least Squares Problems" (DTU, 2004), Alg. 3.16; checked against NIST StRD
 * nonlinear regression datasets (Misra1a–d, Chwirut2, DanWood).
 *
 * @param model predictions and optional analytic Jacobian
 * @param observations y_i
 * @param initialParams starting values
 * @example
 * const x = [1, 2, 3, 4];
 * const y = x.map((v) => 2 * Math.exp(0.3 * v));
 * levenbergMarquardt({ evaluate: (p) => x.map((v) => p[0] * Math.exp(p[1] * v)) }, y, [1, 0.1]).params; // ≈ [2, 0.3]
 */
export function levenbergMarquardt(
  model: LeastSquaresModel,
  observations: readonly number[],
  initialParams: readonly number[],
  options: LevenbergMarquardtOptions = {},
): LevenbergMarquardtResult {
  const maxIterations = options.maxIterations ?? 500;
  const xtol = options.parameterTolerance ?? 1e-11;
  const ftol = options.costTolerance ?? 1e-15;
  const gtol = options.gradientTolerance ?? 1e-10;
  const n = observations.length;
  const np = initialParams.length;
  const w = options.weights ?? new Array<number>(n).fill(1);
  if (n < np)
    throw new AnalysisError('too-few-points', `${np} parameters need at least ${np} observations, got ${n}`);

  const jacobianAt = (p: readonly number[], f: readonly number[]): number[][] =>
    model.jacobian ? model.jacobian(p) : numericJacobian(model, p, f);
  const costOf = (f: readonly number[]): number => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const r = observations[i] - f[i];
      s += w[i] * r * r;
    }
    return s;
  };

  let p = initialParams.slice();
  let f = model.evaluate(p);
  if (!finite(f)) throw new AnalysisError('invalid-input', 'the model is not finite at the starting values');
  let cost = costOf(f);
  let jac = jacobianAt(p, f);
  let lambda = options.initialDamping ?? 1e-3;
  let nu = 2;
  let converged = false;
  let message = `stopped after the maximum of ${maxIterations} iterations without converging`;
  let iterations: number;
  const yScale = observations.reduce((s, y, i) => s + w[i] * y * y, 0);

  outer: for (iterations = 1; iterations <= maxIterations; iterations++) {
    const a: number[][] = Array.from({ length: np }, () => new Array<number>(np).fill(0));
    const g = new Array<number>(np).fill(0);
    for (let i = 0; i < n; i++) {
      const ri = w[i] * (observations[i] - f[i]);
      const row = jac[i];
      for (let j = 0; j < np; j++) {
        g[j] += row[j] * ri;
        const wj = w[i] * row[j];
        for (let k = 0; k <= j; k++) a[j][k] += wj * row[k];
      }
    }
    for (let j = 0; j < np; j++) for (let k = 0; k < j; k++) a[k][j] = a[j][k];
    if (!finite(g) || a.some((row) => !finite(row))) {
      message = 'the Jacobian is not finite';
      break;
    }
    const maxDiag = Math.max(...a.map((row, j) => row[j]));
    if (!(maxDiag > 0)) {
      message = 'the Jacobian is zero: the parameters do not affect the model';
      break;
    }
    const d = a.map((row, j) => Math.max(row[j], maxDiag * 1e-20));
    let gradScaled = 0;
    for (let j = 0; j < np; j++)
      gradScaled = Math.max(gradScaled, Math.abs(g[j]) / Math.sqrt(d[j] * Math.max(cost, 1e-300)));
    if (cost <= 1e-30 * yScale || gradScaled <= gtol) {
      converged = true;
      message = cost <= 1e-30 * yScale ? 'exact fit' : 'gradient below tolerance';
      break;
    }
    for (;;) {
      const m = a.map((row, j) => row.map((v, k) => (j === k ? v + lambda * d[j] : v)));
      const l = cholesky(m);
      if (!l) {
        lambda *= nu;
        nu *= 2;
        if (lambda > 1e30) {
          message = 'damping grew without bound (singular normal equations)';
          break outer;
        }
        continue;
      }
      const delta = choleskySolve(l, g);
      const pNew = p.map((v, j) => v + delta[j]);
      const fNew = model.evaluate(pNew);
      const costNew = finite(fNew) ? costOf(fNew) : Infinity;
      let predicted = 0;
      for (let j = 0; j < np; j++) predicted += delta[j] * (g[j] + lambda * d[j] * delta[j]);
      const rho = (cost - costNew) / predicted;
      if (costNew < cost && rho > 0) {
        const relStep = Math.max(...delta.map((dv, j) => Math.abs(dv) / Math.max(Math.abs(pNew[j]), 1e-300)));
        const actualRel = (cost - costNew) / cost;
        const predictedRel = predicted / cost;
        p = pNew;
        f = fNew;
        cost = costNew;
        jac = jacobianAt(p, f);
        lambda *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
        nu = 2;
        if (relStep <= xtol) {
          converged = true;
          message = 'parameter change below tolerance';
          break outer;
        }
        if (actualRel <= ftol && predictedRel <= ftol) {
          converged = true;
          message = 'cost change below tolerance';
          break outer;
        }
        break;
      }
      lambda *= nu;
      nu *= 2;
      if (lambda > 1e30) {
        // No step lowers the cost: a minimum to machine precision, or a stall.
        converged = gradScaled <= 1e-6;
        message = converged
          ? 'no further decrease possible (minimum to machine precision)'
          : 'stalled: no step lowers the cost';
        break outer;
      }
    }
  }
  if (iterations > maxIterations) iterations = maxIterations;

  const df = n - np;
  const residuals = observations.map((y, i) => y - f[i]);
  const residualSd = df > 0 ? Math.sqrt(cost / df) : null;
  const jtj: number[][] = Array.from({ length: np }, () => new Array<number>(np).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < np; j++) for (let k = 0; k < np; k++) jtj[j][k] += w[i] * jac[i][j] * jac[i][k];
  }
  const inv = invertSpd(jtj);
  const covariance =
    inv && residualSd !== null ? inv.map((row) => row.map((v) => v * residualSd * residualSd)) : null;
  const standardErrors = p.map((_, j) => (covariance ? Math.sqrt(covariance[j][j]) : null));
  const t = df > 0 ? studentTQuantile(0.975, df) : null;
  const ci95 = p.map((v, j): [number, number] | null => {
    const se = standardErrors[j];
    return se !== null && t !== null ? [v - t * se, v + t * se] : null;
  });
  return {
    params: p,
    standardErrors,
    covariance,
    ci95,
    rss: cost,
    residualSd,
    n,
    df,
    residuals,
    fitted: f,
    iterations,
    converged,
    message,
  };
}
