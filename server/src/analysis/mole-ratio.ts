import { branchOf, fitTwoLines, JobBranch } from './two-line-break';

/** One point of a mole-ratio plot. */
export interface MoleRatioPoint {
  /** Varied reactant ÷ fixed reactant (initial concentrations), dimensionless. */
  ratio: number;
  /** Blank-corrected absorbance (complex only). */
  absorbance: number;
}

export interface MoleRatioResult {
  n: number;
  /** Which reactant rises along the series. */
  varied: 'A' | 'B';
  /** Varied ÷ fixed at the intersection of the rising line and the plateau; null when none meets. */
  breakRatio: number | null;
  /**
   * The candidate "a:b" whose ratio (b/a when B varies, a/b when A varies) is nearest the break on a log
   * scale — only within 1.5-fold and inside the series' range; else null.
   */
  nearestModel: string | null;
  absorbanceAtBreak: number | null;
  /** Measured absorbance nearest the break ÷ the lines' intersection (1 = a sharp corner). */
  sharpness: number | null;
  rising: JobBranch | null;
  plateau: JobBranch | null;
  message: string;
}

/**
 * The mole-ratio method: with one reactant held at a constant concentration and the other rising, the
 * absorbance of the complex rises linearly until the fixed reactant is used up and then levels off; the
 * two straight lines meet at the combining ratio (B:A = b/a for A_aB_b when B is varied). The lines are
 * the best two-line least-squares split with a rising first line and a flatter second line.
 *
 * Units: ratios dimensionless; absorbance dimensionless.
 * Reference: Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed. 16, 111; Skoog D.A., Holler F.J.,
 * Crouch S.R., Principles of Instrumental Analysis, 6th ed. (2007), §14D-2 (from memory).
 *
 * @param points the series (ratio of varied to fixed reactant, absorbance)
 * @param varied which reactant rises: 'B' (ratio = B₀/A₀) or 'A' (ratio = A₀/B₀)
 * @param candidates models offered for `nearestModel`
 * @example
 * moleRatioAnalysis([0.25, 0.5, 0.75, 1.25, 1.5, 2].map((r) => ({ ratio: r, absorbance: 0.4 * Math.min(r, 1) })),
 *   'B').breakRatio; // 1
 */
export function moleRatioAnalysis(
  points: readonly MoleRatioPoint[],
  varied: 'A' | 'B',
  candidates: readonly { a: number; b: number; label: string }[] = [
    { a: 1, b: 1, label: '1:1' },
    { a: 1, b: 2, label: '1:2' },
    { a: 2, b: 1, label: '2:1' },
    { a: 1, b: 3, label: '1:3' },
  ],
): MoleRatioResult {
  const pts = points
    .filter((p) => Number.isFinite(p.ratio) && p.ratio >= 0 && Number.isFinite(p.absorbance))
    .slice()
    .sort((u, v) => u.ratio - v.ratio);
  const n = pts.length;
  const none = (message: string): MoleRatioResult => ({
    n,
    varied,
    breakRatio: null,
    nearestModel: null,
    absorbanceAtBreak: null,
    sharpness: null,
    rising: null,
    plateau: null,
    message,
  });
  if (n < 5) return none('a mole-ratio analysis needs at least 5 mixtures of different ratio');
  const best = fitTwoLines(
    pts.map((p) => p.ratio),
    pts.map((p) => p.absorbance),
    (rising, plateau) => rising.slope > 0 && plateau.slope < 0.5 * rising.slope,
  );
  if (!best || !(best.x > 0)) return none('no rising line and plateau meet: the series shows no break');
  // The break names a candidate only when it lies within 1.5-fold of that candidate's ratio and the
  // series has points on both sides of it (an excess-only series shows no combining ratio).
  const lowest = pts[0].ratio;
  const highest = pts[n - 1].ratio;
  let nearest: string | null = null;
  let dist = Infinity;
  for (const c of candidates) {
    const ratio = varied === 'B' ? c.b / c.a : c.a / c.b;
    const d = Math.abs(Math.log(ratio / best.x));
    if (d < dist && d < Math.log(1.5) && lowest < ratio && highest > ratio) {
      dist = d;
      nearest = c.label;
    }
  }
  return {
    n,
    varied,
    breakRatio: best.x,
    nearestModel: nearest,
    absorbanceAtBreak: best.y,
    sharpness: best.sharpness,
    rising: branchOf(best.left),
    plateau: branchOf(best.right),
    message:
      `the rising line and the plateau meet at ${varied}:${varied === 'B' ? 'A' : 'B'} = ${best.x.toFixed(2)}` +
      (nearest ? '' : ', near no candidate ratio inside the series'),
  };
}
