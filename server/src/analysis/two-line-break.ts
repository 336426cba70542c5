import { fitLinear, LinearFit } from './linear-regression';

/** A straight branch of a two-line plot (Job's, mole-ratio). */
export interface JobBranch {
  n: number;
  slope: number;
  intercept: number;
  r2: number;
}

/** The best pair of straight lines through sorted points and where they meet. */
export interface TwoLineBreak {
  /** Where the two lines meet. */
  x: number;
  y: number;
  left: LinearFit;
  right: LinearFit;
  /** Total residual sum of squares of the two lines. */
  rss: number;
  /** Measured y of the point nearest the break ÷ y of the break (1 for a sharp corner). */
  sharpness: number | null;
}

export const branchOf = (f: LinearFit): JobBranch => ({
  n: f.n,
  slope: f.slope,
  intercept: f.intercept,
  r2: f.r2,
});

function lineThrough(xs: readonly number[], ys: readonly number[]): { fit: LinearFit | null; rss: number } {
  if (xs.length === 2) {
    const slope = (ys[1] - ys[0]) / (xs[1] - xs[0]);
    const intercept = ys[0] - slope * xs[0];
    return {
      fit: {
        model: 'linear',
        n: 2,
        df: 0,
        slope,
        intercept,
        slopeSe: NaN,
        interceptSe: null,
        residualSd: NaN,
        rss: 0,
        r2: 1,
        residuals: [0, 0],
        xMean: (xs[0] + xs[1]) / 2,
        yMean: (ys[0] + ys[1]) / 2,
        sxx: 0,
      },
      rss: 0,
    };
  }
  const fit = fitLinear(xs, ys);
  return { fit, rss: fit.rss };
}

/**
 * Two-line (segmented) least squares: every split of the points (sorted by x) with at least two points
 * per side is tried; a straight line is fitted to each side, and the split with the smallest total
 * residual sum of squares whose lines pass `accept` and meet near the split (between the last two left
 * and the first two right points) wins: x* = (c_R − c_L)/(m_L − m_R). Used by Job's method and the mole-ratio method.
 *
 * Units: those of x and y.
 * Reference: Job P. (1928) Ann. Chim. 9, 113; Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed.
 * 16, 111 (intersecting tangents of the mole-ratio plot).
 *
 * @param xs x values, ascending
 * @param ys y values
 * @param accept which slopes make a valid pair (e.g. rising then falling)
 * @example
 * fitTwoLines([1, 2, 3, 4, 5], [1, 2, 3, 3, 3], (l, r) => l.slope > r.slope)?.x; // 3
 */
export function fitTwoLines(
  xs: readonly number[],
  ys: readonly number[],
  accept: (left: LinearFit, right: LinearFit) => boolean,
): TwoLineBreak | null {
  const n = xs.length;
  let best: TwoLineBreak | null = null;
  for (let k = 2; k <= n - 2; k++) {
    if (xs[k - 1] === xs[k]) continue;
    const l = lineThrough(xs.slice(0, k), ys.slice(0, k));
    const r = lineThrough(xs.slice(k), ys.slice(k));
    if (!l.fit || !r.fit || !accept(l.fit, r.fit) || l.fit.slope === r.fit.slope) continue;
    const x = (r.fit.intercept - l.fit.intercept) / (l.fit.slope - r.fit.slope);
    // The lines must meet near the split: between the last two points of the left and the first two of
    // the right (a corner at a measured point may land on either side of it by noise).
    if (!(x >= xs[Math.max(0, k - 2)] - 1e-12 && x <= xs[Math.min(n - 1, k + 1)] + 1e-12)) continue;
    const rss = l.rss + r.rss;
    if (!best || rss < best.rss) {
      const y = l.fit.intercept + l.fit.slope * x;
      const nearest = Math.abs(xs[k - 1] - x) <= Math.abs(xs[k] - x) ? k - 1 : k;
      best = { x, y, left: l.fit, right: r.fit, rss, sharpness: y !== 0 ? ys[nearest] / y : null };
    }
  }
  return best;
}
