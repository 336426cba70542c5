import { JobBatchResult, MoleRatioBatchResult, QcCode } from './batch-types';
import { GlobalFitResult } from './global-fit';
import { EPSILON_UNIT, formatK, formatNumber } from './number-format';

/** A corner sharper than this (measured ÷ intersection absorbance) makes a two-line cross-check decisive. */
const SHARP_CORNER = 0.8;

/** The K range a fit supports: its 95 % interval, its bound, or nothing (null: no range to compare). */
function kRange(fit: GlobalFitResult): [number, number] | null {
  switch (fit.status) {
    case 'determined':
    case 'poorly-determined':
      return fit.kCi95 ? [fit.kCi95[0] ?? 0, fit.kCi95[1] ?? Infinity] : null;
    case 'lower-bound':
      return fit.kLowerBound95 !== null ? [fit.kLowerBound95, Infinity] : null;
    case 'upper-bound':
      return fit.kUpperBound95 !== null ? [0, fit.kUpperBound95] : null;
    default:
      return null;
  }
}

/**
 * Whether two fits of one candidate agree on K: their 95 % ranges (interval or one-sided bound)
 * overlap. True when either has no range to compare.
 *
 * @example
 * intervalsOverlap(heldEpsilonFit, freeEpsilonFit); // false when the intervals are disjoint
 */
export function intervalsOverlap(a: GlobalFitResult, b: GlobalFitResult): boolean {
  const ra = kRange(a);
  const rb = kRange(b);
  if (!ra || !rb) return true;
  return ra[0] <= rb[1] && rb[0] <= ra[1];
}

/** The free-ε cross-check of a candidate, in a sentence for its notes. */
export function crossCheckNotes(held: GlobalFitResult, free: GlobalFitResult): string[] {
  const agree = intervalsOverlap(held, free);
  return [
    `${free.model} with ε fitted too (cross-check): K ${formatK(free)}, ε ${formatNumber(free.epsilonLPerMolCm)} ${EPSILON_UNIT}` +
      (agree ? '' : ' — disagrees with the fit at the batch’s ε'),
  ];
}

/** A stoichiometry cross-check finding for the QC list. */
export interface CrossCheckFinding {
  code: QcCode;
  severity: 'info' | 'warning';
  message: string;
  value: number | null;
}

/**
 * Compares the chosen stoichiometry with the graphical methods: Job's maximum and the mole-ratio break.
 * A disagreement is a warning that names both when the plot has a sharp corner (near complete binding,
 * where these methods are decisive), and a note otherwise (a rounded plot shifts the intersection).
 *
 * Reference: Job P. (1928) Ann. Chim. 9, 113; Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed. 16, 111;
 * Hibbert D.B. & Thordarson P. (2016) Chem. Commun. 52, 12792 (limits of Job's plots).
 *
 * @example
 * stoichiometryCrossChecks('1:1', { nearestModel: '1:2', maxMoleFractionB: 0.667, sharpness: 0.97, … }, null);
 * // [{ code: 'job-disagrees', severity: 'warning', … }]
 */
export function stoichiometryCrossChecks(
  best: string | null,
  job: JobBatchResult | null,
  moleRatio: MoleRatioBatchResult | null,
): CrossCheckFinding[] {
  const out: CrossCheckFinding[] = [];
  if (!best) return out;
  if (job?.nearestModel && job.maxMoleFractionB !== null && job.nearestModel !== best) {
    const sharp = (job.sharpness ?? 0) >= SHARP_CORNER;
    out.push({
      code: 'job-disagrees',
      severity: sharp ? 'warning' : 'info',
      message:
        `Job's maximum at a mole fraction of B of ${job.maxMoleFractionB.toFixed(3)} points to ${job.nearestModel}, ` +
        `but the global fits choose ${best}` +
        (sharp ? '' : ' (the plot is rounded near its maximum, so the intersection is only indicative)'),
      value: job.maxMoleFractionB,
    });
  }
  if (moleRatio?.nearestModel && moleRatio.breakRatio !== null && moleRatio.nearestModel !== best) {
    const sharp = (moleRatio.sharpness ?? 0) >= SHARP_CORNER;
    const other = moleRatio.varied === 'B' ? 'A' : 'B';
    out.push({
      code: 'mole-ratio-disagrees',
      severity: sharp ? 'warning' : 'info',
      message:
        `the mole-ratio break at ${moleRatio.varied}:${other} = ${moleRatio.breakRatio.toFixed(2)} points to ${moleRatio.nearestModel}, ` +
        `but the global fits choose ${best}` +
        (sharp ? '' : ' (the plot bends gradually, so the break is only indicative)'),
      value: moleRatio.breakRatio,
    });
  }
  return out;
}
