import { fitLinear, LinearFit } from './linear-regression';

/** One point of a Job's plot. */
export interface JobPoint {
  /** Mole fraction of B: B₀/(A₀ + B₀), dimensionless. */
  moleFractionB: number;
  /** Blank-corrected absorbance (complex only). */
  absorbance: number;
}

/** A straight branch of the Job's plot. */
export interface JobBranch {
  n: number;
  slope: number;
  intercept: number;
  r2: number;
}

/** Result of a Job's analysis. */
export interface JobResult {
  n: number;
  /** Mole fraction of B at the intersection of the two branches; null when no split works. */
  maxMoleFractionB: number | null;
  /** b/a implied by the maximum: x/(1 − x). */
  impliedRatioBToA: number | null;
  /** The candidate "a:b" whose b/(a+b) is nearest the maximum, among those offered. */
  nearestModel: string | null;
  /** Absorbance at the intersection. */
  absorbanceAtMax: number | null;
  left: JobBranch | null;
  right: JobBranch | null;
  message: string;
}

const branch = (f: LinearFit): JobBranch => ({ n: f.n, slope: f.slope, intercept: f.intercept, r2: f.r2 });

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
 * Job's method of continuous variation: at constant A₀ + B₀, the complex A_aB_b peaks at mole fraction
 * x_B = b/(a + b). The maximum is located by fitting a straight line to each branch (every split with at
 * least two points per side is tried; the split with the smallest total RSS whose rising and falling
 * lines meet between the split points wins) and intersecting them: x* = (c_R − c_L)/(m_L − m_R).
 *
 * Units: mole fraction dimensionless; absorbance dimensionless.
 * Reference: Job P. (1928) Ann. Chim. 9, 113; Renny J.S., Tomasevich L.L., Tallmadge E.H., Collum D.B.
 * (2013) Angew. Chem. Int. Ed. 52, 11998 (uses and limits of the method).
 *
 * @param points Job's series at constant total concentration
 * @param candidates models offered for `nearestModel`, default 1:1, 1:2, 2:1, 1:3
 * @example
 * jobAnalysis([0.1, 0.3, 0.5, 0.7, 0.9].map((x) => ({ moleFractionB: x, absorbance: Math.min(x, 1 - x) }))).maxMoleFractionB; // 0.5
 */
export function jobAnalysis(
  points: readonly JobPoint[],
  candidates: readonly { a: number; b: number; label: string }[] = [
    { a: 1, b: 1, label: '1:1' },
    { a: 1, b: 2, label: '1:2' },
    { a: 2, b: 1, label: '2:1' },
    { a: 1, b: 3, label: '1:3' },
  ],
): JobResult {
  const pts = points
    .filter((p) => Number.isFinite(p.moleFractionB) && Number.isFinite(p.absorbance))
    .slice()
    .sort((u, v) => u.moleFractionB - v.moleFractionB);
  const n = pts.length;
  const none = (message: string): JobResult => ({
    n,
    maxMoleFractionB: null,
    impliedRatioBToA: null,
    nearestModel: null,
    absorbanceAtMax: null,
    left: null,
    right: null,
    message,
  });
  if (n < 4) return none("a Job's analysis needs at least 4 mixtures of different mole fraction");
  const xs = pts.map((p) => p.moleFractionB);
  const ys = pts.map((p) => p.absorbance);
  let best: { rss: number; x: number; y: number; left: LinearFit; right: LinearFit } | null = null;
  for (let k = 2; k <= n - 2; k++) {
    if (xs[k - 1] === xs[k]) continue;
    const l = lineThrough(xs.slice(0, k), ys.slice(0, k));
    const r = lineThrough(xs.slice(k), ys.slice(k));
    if (!l.fit || !r.fit || !(l.fit.slope > 0) || !(r.fit.slope < 0)) continue;
    const x = (r.fit.intercept - l.fit.intercept) / (l.fit.slope - r.fit.slope);
    // The two lines must meet between the last rising and the first falling point.
    if (!(x >= xs[k - 1] - 1e-12 && x <= xs[k] + 1e-12)) continue;
    const rss = l.rss + r.rss;
    if (!best || rss < best.rss)
      best = { rss, x, y: l.fit.intercept + l.fit.slope * x, left: l.fit, right: r.fit };
  }
  if (!best) return none('no rising and falling branches meet: the series shows no maximum');
  const x = best.x;
  let nearest: string | null = null;
  let dist = Infinity;
  for (const c of candidates) {
    const d = Math.abs(c.b / (c.a + c.b) - x);
    if (d < dist) {
      dist = d;
      nearest = c.label;
    }
  }
  return {
    n,
    maxMoleFractionB: x,
    impliedRatioBToA: x < 1 ? x / (1 - x) : null,
    nearestModel: nearest,
    absorbanceAtMax: best.y,
    left: branch(best.left),
    right: branch(best.right),
    message: `the branches meet at a mole fraction of B of ${x.toFixed(3)}`,
  };
}
