import { AnalysisError } from './errors';

/** Ordinary least-squares straight line, with its standard errors. */
export interface LinearFit {
  model: 'linear' | 'through-origin';
  n: number;
  /** Residual degrees of freedom: n − 2 with an intercept, n − 1 through the origin. */
  df: number;
  slope: number;
  /** 0 for a fit through the origin. */
  intercept: number;
  slopeSe: number;
  /** Null for a fit through the origin (no intercept was estimated). */
  interceptSe: number | null;
  /** s_y/x = √(RSS / df), in the units of y. */
  residualSd: number;
  /** Residual sum of squares. */
  rss: number;
  /** Centred R² with an intercept; uncentred R² (1 − RSS/Σy²) through the origin, as NIST StRD does. */
  r2: number;
  /** y − ŷ per point, in input order. */
  residuals: number[];
  xMean: number;
  yMean: number;
  /** Σ(x − x̄)² with an intercept, Σx² through the origin: the denominator of the slope. */
  sxx: number;
}

/** Mean with a second corrective pass (Higham, Accuracy and Stability of Numerical Algorithms, §1.9). */
function stableMean(v: readonly number[]): number {
  const n = v.length;
  let s = 0;
  for (let i = 0; i < n; i++) s += v[i];
  const m = s / n;
  let c = 0;
  for (let i = 0; i < n; i++) c += v[i] - m;
  return m + c / n;
}

/**
 * Fits y = b0 + b1·x (or y = b1·x through the origin) by ordinary least squares using centred
 * sums, so that ill-conditioned data (large x offsets) keep their digits.
 *
 * Formulas (intercept model): b1 = Σ(x−x̄)(y−ȳ)/Σ(x−x̄)², b0 = ȳ − b1·x̄,
 * s = √(Σe²/(n−2)), SE(b1) = s/√Sxx, SE(b0) = s·√(1/n + x̄²/Sxx), R² = 1 − RSS/Σ(y−ȳ)².
 * Through the origin: b1 = Σxy/Σx², s = √(Σe²/(n−1)), SE(b1) = s/√Σx², R² = 1 − RSS/Σy².
 *
 * Units: x and y in any units; slope in y-units per x-unit.
 * Reference: Draper & Smith, Applied Regression Analysis, 3rd ed., ch. 1 and §2.12 (no-intercept);
 * checked against NIST StRD Norris, NoInt1 and NoInt2.
 *
 * @param x predictor values (e.g. concentration, mol/L)
 * @param y responses (e.g. absorbance, dimensionless)
 * @param throughOrigin fit y = b1·x instead of y = b0 + b1·x
 * @throws AnalysisError 'too-few-points' when n < 3 (n < 2 through the origin); 'singular' when all x are equal
 * @example
 * fitLinear([0, 1, 2, 3], [0.01, 1.02, 1.98, 3.01]).slope; // ≈ 0.995
 */
export function fitLinear(x: readonly number[], y: readonly number[], throughOrigin = false): LinearFit {
  const n = x.length;
  if (y.length !== n) throw new AnalysisError('invalid-input', 'x and y must have the same length');
  const p = throughOrigin ? 1 : 2;
  if (n < p + 1) {
    throw new AnalysisError('too-few-points', `a straight-line fit needs at least ${p + 1} points, got ${n}`);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) {
      throw new AnalysisError('invalid-input', `point ${i + 1} is not a finite number`);
    }
  }
  const xMean = stableMean(x);
  const yMean = stableMean(y);
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  if (throughOrigin) {
    for (let i = 0; i < n; i++) {
      sxx += x[i] * x[i];
      sxy += x[i] * y[i];
      syy += y[i] * y[i];
    }
  } else {
    for (let i = 0; i < n; i++) {
      const dx = x[i] - xMean;
      const dy = y[i] - yMean;
      sxx += dx * dx;
      sxy += dx * dy;
      syy += dy * dy;
    }
  }
  if (!(sxx > 0)) throw new AnalysisError('singular', 'all x values are equal: no slope can be fitted');
  const slope = sxy / sxx;
  const intercept = throughOrigin ? 0 : yMean - slope * xMean;
  const residuals = new Array<number>(n);
  let rss = 0;
  for (let i = 0; i < n; i++) {
    // Residual from centred quantities keeps digits when x̄ is large.
    const e = throughOrigin ? y[i] - slope * x[i] : y[i] - yMean - slope * (x[i] - xMean);
    residuals[i] = e;
    rss += e * e;
  }
  const df = n - p;
  const residualSd = Math.sqrt(rss / df);
  const slopeSe = residualSd / Math.sqrt(sxx);
  const interceptSe = throughOrigin ? null : residualSd * Math.sqrt(1 / n + (xMean * xMean) / sxx);
  const r2 = syy > 0 ? 1 - rss / syy : 1;
  return {
    model: throughOrigin ? 'through-origin' : 'linear',
    n,
    df,
    slope,
    intercept,
    slopeSe,
    interceptSe,
    residualSd,
    rss,
    r2,
    residuals,
    xMean,
    yMean,
    sxx,
  };
}
