/**
 * Small dense linear algebra for least squares (p ≤ ~6 parameters). Internal to the module.
 * Matrices are row-major arrays of rows.
 */

/**
 * Cholesky factor L (lower) of a symmetric positive-definite matrix, or null when it is not
 * positive definite. Reference: Golub & Van Loan, Matrix Computations, 4th ed., Alg. 4.2.1.
 */
export function cholesky(a: readonly (readonly number[])[]): number[][] | null {
  const n = a.length;
  const l: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let d = a[j][j];
    for (let k = 0; k < j; k++) d -= l[j][k] * l[j][k];
    if (!(d > 0) || !Number.isFinite(d)) return null;
    const ljj = Math.sqrt(d);
    l[j][j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      l[i][j] = s / ljj;
    }
  }
  return l;
}

/** Solves L·Lᵀ·x = b given the Cholesky factor L. */
export function choleskySolve(l: readonly (readonly number[])[], b: readonly number[]): number[] {
  const n = l.length;
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i][k] * y[k];
    y[i] = s / l[i][i];
  }
  const x = new Array<number>(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= l[k][i] * x[k];
    x[i] = s / l[i][i];
  }
  return x;
}

/**
 * Inverse of a symmetric positive-definite matrix, computed with unit-diagonal scaling so that
 * parameters of very different magnitude (e.g. 240 and 5e-4) do not lose precision.
 * Returns null when the matrix is singular.
 */
export function invertSpd(a: readonly (readonly number[])[]): number[][] | null {
  const n = a.length;
  const scale = a.map((row, i) => (row[i] > 0 ? 1 / Math.sqrt(row[i]) : NaN));
  if (scale.some((s) => !Number.isFinite(s))) return null;
  const scaled = a.map((row, i) => row.map((v, j) => v * scale[i] * scale[j]));
  const l = cholesky(scaled);
  if (!l) return null;
  const inv: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    const e = new Array<number>(n).fill(0);
    e[j] = 1;
    const col = choleskySolve(l, e);
    for (let i = 0; i < n; i++) inv[i][j] = col[i] * scale[i] * scale[j];
  }
  return inv;
}
