import { PositionResult, PositionStatus } from './batch-types';
import { ResolvedAnalysisSettings } from './options';
import { Reading, SampleDefinition } from './types';

/** The positions step: manifest rows joined to readings at the analysed wavelength. */
export interface PositionsStep {
  /** The analysed wavelength, nm; null when there is no reading at all. */
  wavelengthNm: number | null;
  /** Manifest rows by upper-case position (the first row when a position is listed twice). */
  sampleByPosition: ReadonlyMap<string, SampleDefinition>;
  /** Every position named by the manifest or the readings, in plate order; not yet blank-corrected. */
  positions: PositionResult[];
  warnings: string[];
}

const POSITION_RE = /^([A-Z]+)(\d+)$/;

/** Plate order: row letters, then column numbers as numbers (A2 before A10); other names by text. */
export function comparePositions(a: string, b: string): number {
  const ma = POSITION_RE.exec(a);
  const mb = POSITION_RE.exec(b);
  if (ma && mb) return ma[1] === mb[1] ? Number(ma[2]) - Number(mb[2]) : ma[1] < mb[1] ? -1 : 1;
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * The wavelength to analyse, nm: the one the settings name, else the most frequent in the readings
 * (the shorter on a tie), with a warning when the readings hold several.
 *
 * @example
 * chooseWavelength([{ position: 'C1', wavelengthNm: 640, absorbance: 0.2 }], resolveAnalysisSettings({}));
 * // { wavelengthNm: 640, warnings: [] }
 */
export function chooseWavelength(
  readings: readonly Reading[],
  s: ResolvedAnalysisSettings,
): { wavelengthNm: number | null; warnings: string[] } {
  if (s.wavelengthNm !== null) return { wavelengthNm: s.wavelengthNm, warnings: [] };
  const counts = new Map<number, number>();
  for (const r of readings) counts.set(r.wavelengthNm, (counts.get(r.wavelengthNm) ?? 0) + 1);
  if (counts.size === 0) return { wavelengthNm: null, warnings: [] };
  const sorted = [...counts.entries()].sort((u, v) => v[1] - u[1] || u[0] - v[0]);
  const warnings =
    counts.size > 1
      ? [
          `readings at ${counts.size} wavelengths (${[...counts.keys()].sort((u, v) => u - v).join(', ')} nm); ` +
            `analysed ${sorted[0][0]} nm — set the wavelength to choose another`,
        ]
      : [];
  return { wavelengthNm: sorted[0][0], warnings };
}

/** The absorbances that were read (finite numbers); a missing or saturated reading has none. */
function finiteAbsorbances(reads: readonly Reading[]): number[] {
  return reads.flatMap((r) => (r.absorbance !== null && Number.isFinite(r.absorbance) ? [r.absorbance] : []));
}

/** Why a position is or is not used, in this order: no manifest row, excluded, not read, a bad reading. */
function statusOf(
  sample: SampleDefinition | undefined,
  exclusionReason: string | undefined,
  reads: readonly Reading[],
  finiteCount: number,
): PositionStatus {
  if (!sample) return 'no-sample';
  if (exclusionReason !== undefined) return 'excluded';
  if (reads.length === 0) return 'no-reading';
  if (finiteCount < reads.length) return reads.some((r) => r.flag === 'saturated') ? 'saturated' : 'missing';
  return 'used';
}

/**
 * Joins the manifest to the readings. A position's raw absorbance is the mean of its finite readings
 * within `wavelengthToleranceNm` of the analysed wavelength; a missing or saturated reading makes the
 * position unusable (reported, never read as zero). Its path length is the per-position setting, else
 * the batch's. Positions are matched case-insensitively and sorted in plate order.
 *
 * Units: absorbance dimensionless, wavelength nm, path cm.
 *
 * @example
 * resolvePositions(
 *   [{ position: 'c1', wavelengthNm: 640, absorbance: 0.2 }],
 *   [{ position: 'C1', sampleId: 'B', role: 'blank' }],
 *   resolveAnalysisSettings({}),
 * ).positions[0]; // { position: 'C1', absorbanceRaw: 0.2, status: 'used', … }
 */
export function resolvePositions(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  s: ResolvedAnalysisSettings,
): PositionsStep {
  const chosen = chooseWavelength(readings, s);
  const wavelengthNm = chosen.wavelengthNm;
  const warnings = [...chosen.warnings];
  const sampleByPosition = new Map<string, SampleDefinition>();
  for (const sample of samples) {
    const pos = sample.position.toUpperCase();
    if (sampleByPosition.has(pos)) warnings.push(`manifest lists ${pos} twice; the first row is used`);
    else sampleByPosition.set(pos, sample);
  }
  const readsByPosition = new Map<string, Reading[]>();
  for (const r of readings) {
    if (wavelengthNm === null || Math.abs(r.wavelengthNm - wavelengthNm) > s.wavelengthToleranceNm) continue;
    const pos = r.position.toUpperCase();
    const list = readsByPosition.get(pos);
    if (list) list.push(r);
    else readsByPosition.set(pos, [r]);
  }
  const exclusionByPosition = new Map(s.exclusions.map((e) => [e.position, e.reason]));
  for (const e of s.exclusions) {
    if (!sampleByPosition.has(e.position) && !readsByPosition.has(e.position)) {
      warnings.push(`exclusion of ${e.position} matches no position in this batch`);
    }
  }
  const allPositions = [...new Set([...sampleByPosition.keys(), ...readsByPosition.keys()])].sort(
    comparePositions,
  );
  const positions = allPositions.map((position): PositionResult => {
    const sample = sampleByPosition.get(position);
    const reads = readsByPosition.get(position) ?? [];
    const finite = finiteAbsorbances(reads);
    const status = statusOf(sample, exclusionByPosition.get(position), reads, finite.length);
    return {
      position,
      sampleId: sample?.sampleId ?? null,
      role: sample?.role ?? null,
      replicateGroup: sample?.replicateGroup ?? null,
      absorbanceRaw: finite.length > 0 ? finite.reduce((sum, a) => sum + a, 0) / finite.length : null,
      reads: reads.length,
      pathLengthCm: s.pathLengthByPositionCm[position] ?? s.pathLengthCm,
      absorbanceCorrected: null,
      status,
      exclusionReason: status === 'excluded' ? (exclusionByPosition.get(position) ?? null) : null,
    };
  });
  const unassigned = positions.filter((p) => p.status === 'no-sample').map((p) => p.position);
  if (unassigned.length)
    warnings.push(`readings at ${unassigned.join(', ')} have no manifest row and were not used`);
  const unread = positions.filter((p) => p.status === 'no-reading').map((p) => p.position);
  if (unread.length) warnings.push(`no reading at ${wavelengthNm ?? '?'} nm for ${unread.join(', ')}`);
  return { wavelengthNm, sampleByPosition, positions, warnings };
}
