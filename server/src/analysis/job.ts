import { branchOf, fitTwoLines, JobBranch } from './two-line-break';

/** One point of a Job's plot. */
export interface JobPoint {
  /** Mole fraction of B: B₀/(A₀ + B₀), dimensionless. */
  moleFractionB: number;
  /** Blank-corrected absorbance (complex only). */
  absorbance: number;
}

export type { JobBranch } from './two-line-break';

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
  /** Measured absorbance nearest the maximum ÷ the lines' intersection (1 = a sharp corner); null without one. */
  sharpness: number | null;
  left: JobBranch | null;
  right: JobBranch | null;
  message: string;
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
    sharpness: null,
    left: null,
    right: null,
    message,
  });
  if (n < 4) return none("a Job's analysis needs at least 4 mixtures of different mole fraction");
  const xs = pts.map((p) => p.moleFractionB);
  const ys = pts.map((p) => p.absorbance);
  const best = fitTwoLines(xs, ys, (left, right) => left.slope > 0 && right.slope < 0);
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
    sharpness: best.sharpness,
    left: branchOf(best.left),
    right: branchOf(best.right),
    message: `the branches meet at a mole fraction of B of ${x.toFixed(3)}`,
  };
}
