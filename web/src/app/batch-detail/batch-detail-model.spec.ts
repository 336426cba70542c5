import {
  VIRIDIS_CONTROL_POINTS,
  relativeLuminance,
  textColourOn,
  viridis,
} from '../shared/chart/colour-scale';
import { fixtureBatch } from './analysis-fixture';
import { formatNumber, kUnit } from '../shared/format/number-format';
import { QC_GUIDANCE } from '../shared/qc/qc-guidance';
import {
  NO_EDITS,
  describeEdits,
  effectiveExclusions,
  epsilonSourceLabel,
  hasEdits,
  settingsPatch,
  withExclusion,
  withoutExclusion,
} from './what-if';

describe('viridis scale', () => {
  it('passes through its published control points and clamps outside [0, 1]', () => {
    VIRIDIS_CONTROL_POINTS.forEach((hex, i) => expect(viridis(i / 8)).toBe(hex));
    expect(viridis(-1)).toBe('#440154');
    expect(viridis(2)).toBe('#fde725');
  });

  it('gets lighter monotonically (perceptual order survives greyscale)', () => {
    const l = Array.from({ length: 41 }, (_, i) => relativeLuminance(viridis(i / 40)));
    for (let i = 1; i < l.length; i++) expect(l[i]).toBeGreaterThan(l[i - 1]);
  });

  it('puts white ink on the dark end and black ink on the light end', () => {
    expect(textColourOn(viridis(0))).toBe('#ffffff');
    expect(textColourOn(viridis(1))).toBe('#000000');
  });
});

describe('number format', () => {
  it('writes small and large numbers as m × 10ⁿ and plain ones plainly', () => {
    expect(formatNumber(3.9259e-6)).toBe('3.93 × 10⁻⁶');
    expect(formatNumber(621.16, 4)).toBe('621.2');
    expect(formatNumber(1.2554e7)).toBe('1.26 × 10⁷');
    expect(formatNumber(null)).toBe('—');
  });

  it('gives K its unit M^(1−a−b) in L and mol', () => {
    expect(kUnit(1, 1)).toBe('L·mol⁻¹');
    expect(kUnit(1, 2)).toBe('L²·mol⁻²');
    expect(kUnit(2, 2)).toBe('L³·mol⁻³');
  });
});

describe('what-if edits', () => {
  const saved = [{ position: 'C3', reason: 'cracked cuvette' }];

  it('adds, replaces and takes back exclusions on top of the saved ones', () => {
    let e = withExclusion(NO_EDITS, { position: 'c20', reason: ' bubble ' });
    expect(hasEdits(e)).toBe(true);
    expect(effectiveExclusions(saved, e)).toEqual([...saved, { position: 'C20', reason: 'bubble' }]);
    e = withoutExclusion(e, 'C3', saved);
    expect(effectiveExclusions(saved, e)).toEqual([{ position: 'C20', reason: 'bubble' }]);
    e = withoutExclusion(e, 'C20', saved);
    expect(effectiveExclusions(saved, e)).toEqual([]);
    expect(describeEdits(e)).toEqual(['Include C3 again']);
  });

  it('sends only what changed', () => {
    const batch = fixtureBatch();
    expect(settingsPatch(batch.settings, { ...NO_EDITS, pathLengthCm: 0.5 })).toEqual({ pathLengthCm: 0.5 });
    expect(
      settingsPatch(batch.settings, {
        ...NO_EDITS,
        epsilon: { lPerMolCm: 1234, sourceBatchId: 3, label: 'the calibration of run 3' },
        candidates: ['1:1'],
      }),
    ).toEqual({ epsilonFromBatchId: 3, candidates: ['1:1'] });
    // Back to this batch's own standards: the value goes, and with it the source.
    expect(
      settingsPatch(batch.settings, {
        ...NO_EDITS,
        epsilon: { lPerMolCm: null, sourceBatchId: null, label: "this batch's standards" },
      }),
    ).toEqual({ epsilonLPerMolCm: null });
  });

  it('names the batch and approval record ε came from', () => {
    expect(epsilonSourceLabel({ batchName: 'Run 12', recordId: 4 })).toBe(
      'batch "Run 12", approval record 4',
    );
    expect(epsilonSourceLabel({ batchName: 'Run 13', recordId: null })).toBe(
      'batch "Run 13", not approved (its analysis now)',
    );
  });
});

describe('QC guidance', () => {
  it('says what each flag means and what to do', () => {
    for (const g of Object.values(QC_GUIDANCE)) {
      expect(g.meaning.length).toBeGreaterThan(20);
      expect(g.action.length).toBeGreaterThan(10);
    }
  });
});
