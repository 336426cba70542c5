import type { QcFlag } from './batch-types';

/**
 * The positions a QC finding names. A replicate group's finding names all of its positions in one
 * field, separated by spaces (or commas), e.g. "C10 C11".
 */
export function qcFindingPositions(f: QcFlag): string[] {
  return f.position ? f.position.split(/[\s,;]+/).filter(Boolean) : [];
}

/**
 * The QC findings that concern one row of a table: those naming its sample id or one of its
 * positions. Screens and reports use the same rule, so a row shows the same findings everywhere.
 *
 * @example
 * ownFindings(result.qc, 'SMP-017', ['C10']); // includes a replicate finding whose position is "C10 C11"
 */
export function ownFindings(
  qc: readonly QcFlag[],
  sampleId: string | null,
  positions: readonly string[],
): QcFlag[] {
  return qc.filter(
    (f) =>
      (sampleId !== null && f.sampleId === sampleId) ||
      qcFindingPositions(f).some((p) => positions.includes(p)),
  );
}
