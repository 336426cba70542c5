import { PositionResult, ReplicateGroupResult } from './batch-types';
import { replicateStats } from './replicates';
import { SampleDefinition } from './types';

/** A replicate group as the later steps read it: its manifest row, its positions and their mean. */
export interface ReplicateGroup {
  /** `role:replicateGroup`, or `role@position` for a position without a group. */
  key: string;
  /** The manifest row of the group's first position. */
  sample: SampleDefinition;
  positions: PositionResult[];
  /** Mean corrected absorbance of the used positions; null when none is usable. */
  mean: number | null;
  /** Number of used positions in the mean. */
  n: number;
}

/** The replicates step: the groups for the later steps and their statistics for the result. */
export interface ReplicatesStep {
  groups: ReplicateGroup[];
  replicates: ReplicateGroupResult[];
  warnings: string[];
}

/**
 * Groups positions with a manifest row by role and replicate group (a position without a group is a
 * group of its own), in the order of their first position, and gives each group the mean, SD and CV of
 * its used, blank-corrected absorbances. Skipped (saturated, missing, unread) and excluded positions
 * are counted, never averaged.
 *
 * Units: absorbance dimensionless; CV a fraction.
 * Reference: ISO 3534-1:2006 (sample mean, sample standard deviation, coefficient of variation), via
 * `replicates.ts`.
 *
 * @example
 * groupReplicates(blanked.positions, located.sampleByPosition).replicates[0]; // { group: 'B', n: 2, mean: 0.001, … }
 */
export function groupReplicates(
  positions: readonly PositionResult[],
  sampleByPosition: ReadonlyMap<string, SampleDefinition>,
): ReplicatesStep {
  const warnings: string[] = [];
  const members = new Map<string, { sample: SampleDefinition; positions: PositionResult[] }>();
  for (const p of positions) {
    const sample = sampleByPosition.get(p.position);
    if (!sample) continue;
    const key = sample.replicateGroup
      ? `${sample.role}:${sample.replicateGroup}`
      : `${sample.role}@${p.position}`;
    const g = members.get(key);
    if (g) {
      if (g.sample.sampleId !== sample.sampleId) {
        warnings.push(
          `replicate group ${sample.replicateGroup} mixes samples ${g.sample.sampleId} and ${sample.sampleId}`,
        );
      }
      g.positions.push(p);
    } else members.set(key, { sample, positions: [p] });
  }
  const groups: ReplicateGroup[] = [];
  const replicates: ReplicateGroupResult[] = [];
  for (const [key, g] of members) {
    const stats = replicateStats(
      g.positions.filter((p) => p.status === 'used').map((p) => p.absorbanceCorrected),
    );
    groups.push({ key, sample: g.sample, positions: g.positions, mean: stats.mean, n: stats.n });
    replicates.push({
      group: g.sample.replicateGroup ?? g.positions[0].position,
      sampleId: g.sample.sampleId,
      role: g.sample.role,
      positions: g.positions.map((p) => p.position),
      n: stats.n,
      skipped: g.positions.filter(
        (p) => p.status === 'saturated' || p.status === 'missing' || p.status === 'no-reading',
      ).length,
      excluded: g.positions.filter((p) => p.status === 'excluded').length,
      mean: stats.mean,
      sd: stats.sd,
      cv: stats.cv,
    });
  }
  return { groups, replicates, warnings };
}
