import { mean, sampleStandardDeviation } from 'simple-statistics';
import { correctForBlank } from '../../batch-step-blank';
import { resolvePositions } from '../../batch-step-positions';
import { groupReplicates } from '../../batch-step-replicates';
import { resolveAnalysisSettings } from '../../options';
import { Reading, SampleDefinition } from '../../types';

// Invented cuvettes: a blank pair, an unknown in triplicate (one saturated), an excluded duplicate, and
// a standard without a group.
const samples: SampleDefinition[] = [
  { position: 'C1', sampleId: 'BLK', role: 'blank', replicateGroup: 'B' },
  { position: 'C2', sampleId: 'BLK', role: 'blank', replicateGroup: 'B' },
  { position: 'C3', sampleId: 'U1', role: 'unknown', replicateGroup: 'U1' },
  { position: 'C4', sampleId: 'U1', role: 'unknown', replicateGroup: 'U1' },
  { position: 'C5', sampleId: 'U1', role: 'unknown', replicateGroup: 'U1' },
  { position: 'C6', sampleId: 'U1', role: 'unknown', replicateGroup: 'U1' },
  { position: 'C7', sampleId: 'S1', role: 'standard', concentrationM: 1e-4 },
  { position: 'C8', sampleId: 'U2', role: 'unknown', replicateGroup: 'U1' },
];
const values: Record<string, number | null> = {
  C1: 0.041,
  C2: 0.043,
  C3: 0.412,
  C4: 0.398,
  C5: 0.405,
  C6: null,
  C7: 0.17,
  C8: 0.3,
};
const readings: Reading[] = Object.entries(values).map(([position, absorbance]) => ({
  position,
  wavelengthNm: 600,
  absorbance,
  ...(absorbance === null ? { flag: 'saturated' as const } : {}),
}));

describe('replicates step', () => {
  const s = resolveAnalysisSettings({ exclusions: [{ position: 'C5', reason: 'fingerprint' }] });
  const located = resolvePositions(readings, samples, s);
  const blanked = correctForBlank(located.positions, s);
  const step = groupReplicates(blanked.positions, located.sampleByPosition);

  it('groups by role and replicate group, a position without a group on its own, in first-position order', () => {
    expect(step.groups.map((g) => g.key)).toEqual(['blank:B', 'unknown:U1', 'standard@C7']);
    expect(step.replicates.map((r) => [r.group, r.positions])).toEqual([
      ['B', ['C1', 'C2']],
      ['U1', ['C3', 'C4', 'C5', 'C6', 'C8']],
      ['C7', ['C7']],
    ]);
  });

  it('gives mean, SD and CV of the used corrected absorbances (checked against simple-statistics)', () => {
    // Source: ISO 3534-1 sample mean and SD; reference values from the simple-statistics library.
    const blank = mean([0.041, 0.043]);
    const used = [0.412, 0.398, 0.3].map((a) => a - blank);
    const u1 = step.replicates[1];
    expect(u1.n).toBe(3);
    expect(u1.mean).toBeCloseTo(mean(used), 14);
    expect(u1.sd).toBeCloseTo(sampleStandardDeviation(used), 14);
    expect(u1.cv).toBeCloseTo(sampleStandardDeviation(used) / mean(used), 12);
    expect(step.groups[1].mean).toBe(u1.mean);
    expect(step.groups[1].n).toBe(3);
  });

  it('counts skipped and excluded positions instead of averaging them', () => {
    expect(step.replicates[1]).toMatchObject({ skipped: 1, excluded: 1 });
    expect(step.replicates[2]).toMatchObject({ n: 1, sd: null, cv: null });
  });

  it('warns when a replicate group mixes samples (the first row names the group)', () => {
    expect(step.groups[1].sample.sampleId).toBe('U1');
    expect(step.warnings).toEqual(['replicate group U1 mixes samples U1 and U2']);
  });
});
