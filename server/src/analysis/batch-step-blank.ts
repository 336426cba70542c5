import { PositionResult } from './batch-types';
import { blankCorrection, BlankCorrection } from './blank';
import { ResolvedAnalysisSettings } from './options';

/** The blank step: the blank level and every usable position's corrected absorbance. */
export interface BlankStep {
  blank: BlankCorrection;
  /** The positions again, each usable one with `absorbanceCorrected` set (new objects; the input is left as it was). */
  positions: PositionResult[];
  warnings: string[];
}

/**
 * Blank correction and path-length scaling: A_corrected = (A − Ā_blank) × (l_batch / l_position), with
 * Ā_blank the mean of the usable blank positions (0 when there is none, with a warning). Positions that
 * are not used, or have no reading, keep `absorbanceCorrected: null`.
 *
 * Units: absorbance dimensionless, path cm.
 * Reference: Beer–Lambert law A = ε·l·c (absorbance scales with the path length); reagent-blank
 * subtraction as in `blank.ts`.
 *
 * @example
 * correctForBlank(positions, resolveAnalysisSettings({ pathLengthCm: 1 })).positions[2].absorbanceCorrected; // A − Ā_blank
 */
export function correctForBlank(
  positions: readonly PositionResult[],
  s: ResolvedAnalysisSettings,
): BlankStep {
  const blank = blankCorrection(
    positions
      .filter((p) => p.role === 'blank' && p.status === 'used')
      .map((p) => ({ position: p.position, absorbance: p.absorbanceRaw })),
  );
  const corrected = positions.map((p): PositionResult =>
    p.status !== 'used' || p.absorbanceRaw === null
      ? { ...p }
      : {
          ...p,
          absorbanceCorrected: (p.absorbanceRaw - blank.meanAbsorbance) * (s.pathLengthCm / p.pathLengthCm),
        },
  );
  return {
    blank,
    positions: corrected,
    warnings: blank.n === 0 ? ['no usable blank: absorbances are used as read'] : [],
  };
}
