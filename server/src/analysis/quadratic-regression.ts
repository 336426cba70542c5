import { AnalysisError } from './errors';
import { cholesky, choleskySolve, invertSpd } from './linear-algebra';

/** y = b0 + b1·x + b2·x² by least squares. */
export interface QuadraticFit {
  n: number;
  df: number;
  /** Coefficients b0, b1, b2 and their standard errors. */
  coefficients: [number, number, number];
  standardErrors: [number, number, number];
  rss: number;
  /** √(RSS/(n − 3)). */
  residualSd: number;
  r2: number;
}

/**
 * Quadratic least squares y = b0 + b1·x + b2·x², solved on the centred and scaled variable
 * u = (x − x̄)/s_x (well conditioned even for x of order 10⁶) by the normal equations and Cholesky,
 * then transformed back; SEs from s²·(XᵀX)⁻¹ by the same transformation.
 *
 * Units: those of x and y.
 * Reference: Draper N.R. & Smith H., Applied Regression Analysis, 3rd ed. (Wiley, 1998), ch. 12;
 * checked against NIST StRD Pontius (certified quadratic fit).
 *
 * @throws AnalysisError 'invalid-input' with fewer than 4 points or fewer than 3 distinct x
 * @example
 * fitQuadratic([0, 1, 2, 3], [1, 2, 5, 10]).coefficients; // [1, 0, 1]
 */
export function fitQuadratic(x: readonly number[], y: readonly number[]): QuadraticFit {
  const n = x.length;
  if (n !== y.length || n < 4)
    throw new AnalysisError('invalid-input', 'a quadratic fit needs at least 4 points');
  if (new Set(x).size < 3)
    throw new AnalysisError('invalid-input', 'a quadratic fit needs at least 3 distinct x');
  const xm = x.reduce((s, v) => s + v, 0) / n;
  const sx = Math.sqrt(x.reduce((s, v) => s + (v - xm) ** 2, 0) / n);
  const u = x.map((v) => (v - xm) / sx);
  const xtx = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const xty = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    const row = [1, u[i], u[i] * u[i]];
    for (let j = 0; j < 3; j++) {
      xty[j] += row[j] * y[i];
      for (let k = 0; k < 3; k++) xtx[j][k] += row[j] * row[k];
    }
  }
  const l = cholesky(xtx);
  const inv = invertSpd(xtx);
  if (!l || !inv) throw new AnalysisError('invalid-input', 'the quadratic fit is singular');
  const [c0, c1, c2] = choleskySolve(l, xty);
  let rss = 0;
  const ym = y.reduce((s, v) => s + v, 0) / n;
  let tss = 0;
  for (let i = 0; i < n; i++) {
    rss += (y[i] - (c0 + c1 * u[i] + c2 * u[i] * u[i])) ** 2;
    tss += (y[i] - ym) ** 2;
  }
  const df = n - 3;
  const s2 = rss / df;
  // Back to x: b2 = c2/sx², b1 = c1/sx − 2·c2·xm/sx², b0 = c0 − c1·xm/sx + c2·xm²/sx². T maps c → b.
  const t = [
    [1, -xm / sx, (xm * xm) / (sx * sx)],
    [0, 1 / sx, (-2 * xm) / (sx * sx)],
    [0, 0, 1 / (sx * sx)],
  ];
  const b = t.map((r) => r[0] * c0 + r[1] * c1 + r[2] * c2) as [number, number, number];
  const se = [0, 1, 2].map((j) => {
    let v = 0;
    for (let a = 0; a < 3; a++) for (let c = 0; c < 3; c++) v += t[j][a] * inv[a][c] * t[j][c];
    return Math.sqrt(s2 * v);
  }) as [number, number, number];
  return {
    n,
    df,
    coefficients: b,
    standardErrors: se,
    rss,
    residualSd: Math.sqrt(s2),
    r2: tss > 0 ? 1 - rss / tss : 1,
  };
}
