import { replicateStats } from './replicates';

/** The blank level subtracted from every reading. */
export interface BlankCorrection {
  /** Number of blank readings used. */
  n: number;
  /** Mean blank absorbance (0 when there is no blank). */
  meanAbsorbance: number;
  /** SD of the blank readings; null with fewer than 2. */
  sd: number | null;
  /** Positions of the blanks used. */
  positions: string[];
}

/**
 * Blank correction: A_corrected = A − Ā_blank, with Ā_blank the mean of the blank readings
 * (missing or saturated blanks are skipped). Without a usable blank the level is 0 and n = 0.
 *
 * Units: absorbance, dimensionless.
 * Reference: common practice of reagent-blank subtraction (e.g. Harris D.C., Quantitative Chemical
 * Analysis, ch. 4).
 *
 * @example
 * blankCorrection([{ position: 'C1', absorbance: 0.041 }, { position: 'C2', absorbance: 0.043 }]).meanAbsorbance; // 0.042
 */
export function blankCorrection(
  blanks: readonly { position: string; absorbance: number | null }[],
): BlankCorrection {
  const used = blanks.filter((b) => b.absorbance !== null && Number.isFinite(b.absorbance));
  const stats = replicateStats(used.map((b) => b.absorbance));
  return {
    n: stats.n,
    meanAbsorbance: stats.mean ?? 0,
    sd: stats.sd,
    positions: used.map((b) => b.position),
  };
}
