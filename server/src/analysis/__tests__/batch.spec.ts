import fc from 'fast-check';
import { analyzeBatch } from '../batch';
import { seededRandom } from '../random';
import { makeBatch } from './batch-fixtures';

describe('analyzeBatch', () => {
  const { readings, samples } = makeBatch();
  const result = analyzeBatch(readings, samples);

  it('corrects for the blank, calibrates and reads unknowns back (invented data)', () => {
    expect(result.wavelengthNm).toBe(640);
    expect(result.blank.n).toBe(2);
    expect(result.blank.meanAbsorbance).toBeCloseTo(0.04, 2);
    expect(result.calibration?.n).toBe(6);
    expect(Math.abs((result.calibration?.epsilonLPerMolCm as number) / 1250 - 1)).toBeLessThan(0.01);
    expect(result.unknowns[0].n).toBe(2);
    expect(result.unknowns[0].concentrationM as number).toBeCloseTo(3e-3, 4);
    expect(result.unknowns[0].seM as number).toBeGreaterThan(0);
  });

  it('ranks 1:1 first, fits K near the truth, finds the Job maximum and runs Benesi–Hildebrand', () => {
    expect(result.stoichiometry?.best).toBe('1:1');
    const best = result.stoichiometry?.candidates[0];
    // One noisy realisation: K within 3 % of the truth (the coverage of its 95 % interval over many
    // realisations is tested in verdict-hard-cases.spec.ts).
    expect(Math.abs((best?.fit?.k as number) / 850 - 1)).toBeLessThan(0.03);
    const [lo, hi] = best?.fit?.kCi95 as [number, number];
    expect(lo).toBeLessThan(best?.fit?.k as number);
    expect(hi).toBeGreaterThan(best?.fit?.k as number);
    expect(best?.fit?.epsilonFixed).toBe(true);
    expect(result.headline?.kUnit).toBe('L·mol⁻¹');
    expect(result.stoichiometry?.verdict).toMatch(/^1:1 fits best/);
    expect(result.job?.n).toBe(9);
    expect(result.job?.nearestModel).toBe('1:1');
    expect(result.benesiHildebrand?.applicable).toBe(true);
    expect(result.uncertainty?.propagation?.lnKSd as number).toBeGreaterThan(0);
    expect(result.mixtures[0].ice.map((r) => r.model)).toEqual(['1:1', '1:2', '2:1', '1:3']);
  });

  it('is plain JSON: a round trip through JSON gives the same object', () => {
    expect(JSON.parse(JSON.stringify(result))).toEqual(result);
  });

  it('honours exclusions with their reasons', () => {
    const r = analyzeBatch(readings, samples, {
      exclusions: [{ position: 'c3', reason: 'bubble in cuvette' }],
    });
    const p = r.positions.find((x) => x.position === 'C3');
    expect(p?.status).toBe('excluded');
    expect(p?.exclusionReason).toBe('bubble in cuvette');
    expect(r.calibration?.n).toBe(5);
    expect(r.exclusions).toEqual([{ position: 'C3', reason: 'bubble in cuvette' }]);
  });

  it('skips saturated and missing readings and reports them, never as zero', () => {
    const changed = readings.map((r) =>
      r.position === 'C4'
        ? { ...r, absorbance: null, flag: 'saturated' as const }
        : r.position === 'C9'
          ? { ...r, absorbance: null }
          : r,
    );
    const r = analyzeBatch(changed, samples);
    expect(r.positions.find((p) => p.position === 'C4')?.status).toBe('saturated');
    expect(r.qc.map((f) => f.code)).toEqual(expect.arrayContaining(['saturated-reading', 'missing-reading']));
    expect(r.calibration?.n).toBe(5);
    const u1 = r.replicates.find((g) => g.sampleId === 'U1');
    expect(u1?.n).toBe(1);
    expect(u1?.skipped).toBe(1);
  });

  it('raises the QC flags with the thresholds from the settings', () => {
    const changed = readings.map((r) =>
      r.position === 'C9' ? { ...r, absorbance: 0.6 } : r.position === 'C5' ? { ...r, absorbance: 0.02 } : r,
    );
    const r = analyzeBatch(changed, samples, { linearRangeMaxAbsorbance: 0.5, r2Min: 0.99999 });
    const codes = r.qc.map((f) => f.code);
    expect(codes).toEqual(
      expect.arrayContaining([
        'above-linear-range',
        'negative-absorbance',
        'replicate-cv-high',
        'calibration-r2-low',
      ]),
    );
    const cv = r.qc.find((f) => f.code === 'replicate-cv-high');
    expect(cv?.threshold).toBe(0.05);
  });

  it('flags K that is constant under no candidate', () => {
    const rng = seededRandom(1);
    const scrambled = readings.map((r) => {
      const s = samples.find((x) => x.position === r.position);
      return s?.role === 'mixture' ? { ...r, absorbance: 0.05 + 0.5 * rng.uniform() } : r;
    });
    const r = analyzeBatch(scrambled, samples);
    expect(r.qc.map((f) => f.code)).toContain('k-not-constant');
  });

  it('warns about readings without a manifest row and picks the most frequent wavelength', () => {
    const extra = [
      ...readings,
      { position: 'C99', wavelengthNm: 640, absorbance: 0.3 },
      { position: 'C1', wavelengthNm: 900, absorbance: 0.1 },
    ];
    const r = analyzeBatch(extra, samples);
    expect(r.wavelengthNm).toBe(640);
    expect(r.warnings.join('\n')).toMatch(/C99 have no manifest row/);
    expect(r.warnings.join('\n')).toMatch(/2 wavelengths/);
  });

  it('does not depend on the order of readings or manifest rows (property)', () => {
    const key = (r: ReturnType<typeof analyzeBatch>): unknown => ({
      k: r.stoichiometry?.candidates.map((c) => [c.model, c.fit?.k?.toPrecision(8)]),
      cal: r.calibration?.slope.toPrecision(10),
      u: r.unknowns.map((u) => u.concentrationM?.toPrecision(10)),
    });
    const ref = key(result);
    fc.assert(
      fc.property(
        fc.shuffledSubarray(readings, { minLength: readings.length, maxLength: readings.length }),
        fc.shuffledSubarray(samples, { minLength: samples.length, maxLength: samples.length }),
        (rs, ss) => {
          expect(key(analyzeBatch(rs, ss))).toEqual(ref);
        },
      ),
      { seed: 13, numRuns: 10 },
    );
  });

  it('runs a reproducible Monte Carlo when asked', () => {
    const a = analyzeBatch(readings, samples, { monteCarlo: { draws: 200, seed: 3 } });
    const b = analyzeBatch(readings, samples, { monteCarlo: { draws: 200, seed: 3 } });
    expect(a.uncertainty?.monteCarlo?.kCi95).toEqual(b.uncertainty?.monteCarlo?.kCi95);
    expect(a.uncertainty?.monteCarlo?.draws).toBe(200);
  });
});
