import { analyseMixtures, isUsableMixture } from '../../batch-step-mixtures';
import { resolveAnalysisSettings } from '../../options';
import {
  BLANK,
  complexOneToOne,
  EPSILON,
  EXCESS_FE_ML,
  ironThiocyanateBatch,
  K1,
  runToMixtures,
  STOCK_FE,
  STOCK_SCN,
} from './iron-thiocyanate';

describe('mixtures step (Fe³⁺ + SCN⁻, K₁ from de Berg et al. 2016)', () => {
  const exact = runToMixtures(ironThiocyanateBatch(EXCESS_FE_ML, 0));

  it('gives A₀ and B₀ by C₁V₁ = C₂V₂ and the mole fraction of B', () => {
    // Source: C₁V₁ = C₂V₂ (shared/reference/other_facts.json dilution, common practice).
    const m = exact.mix.mixtures[0];
    expect(m.a0M).toBeCloseTo((STOCK_FE * 0.5) / 10, 15);
    expect(m.b0M).toBeCloseTo((STOCK_SCN * 2) / 10, 15);
    expect(m.moleFractionB).toBeCloseTo(m.b0M / (m.a0M + m.b0M), 15);
    expect(m.totalVolumeMl).toBe(10);
  });

  it('reads the complex as (A − blank)/(ε·l) and the ICE table gives back the published K₁', () => {
    exact.mix.mixtures.forEach((m, i) => {
      const a0 = (STOCK_FE * EXCESS_FE_ML[i]) / 10;
      const x = complexOneToOne(K1, a0, m.b0M);
      expect(m.productM!).toBeCloseTo(x, 12);
      const row = m.ice.find((r) => r.model === '1:1')!;
      // K = x/((A₀ − x)(B₀ − x)) for 1:1: de Berg et al. (2016) K₁ = 98 M⁻¹.
      expect(row.k!).toBeCloseTo(K1, 6);
      expect(row.aFreeM).toBeCloseTo(a0 - x, 12);
    });
    expect(exact.mix.epsilonSource.kind).toBe('given');
    expect(exact.blanked.blank.meanAbsorbance).toBeCloseTo(BLANK, 12);
  });

  it('marks a candidate impossible where a reactant would go negative (1:2 needs 2x ≤ B₀)', () => {
    const last = exact.mix.mixtures[exact.mix.mixtures.length - 1];
    expect(2 * last.productM!).toBeGreaterThan(last.b0M);
    expect(last.ice.find((r) => r.model === '1:2')?.feasible).toBe(false);
    expect(last.flags).toEqual(['candidate-impossible']);
  });

  it('hands the usable mixtures and their measurements (absorbance less the intercept) on', () => {
    expect(exact.mix.usable).toHaveLength(EXCESS_FE_ML.length);
    expect(exact.mix.usable.every(isUsableMixture)).toBe(true);
    expect(exact.mix.measurements[0]).toMatchObject({
      stockAM: STOCK_FE,
      volumeAMl: 0.5,
      totalVolumeMl: 10,
      pathLengthCm: 1,
      replicates: 1,
    });
    expect(exact.mix.measurements[0].absorbance).toBeCloseTo(
      EPSILON * complexOneToOne(K1, (STOCK_FE * 0.5) / 10, 2e-4),
      12,
    );
  });

  it('without ε: no product, no ICE rows, and the ε note as a warning', () => {
    const none = runToMixtures(ironThiocyanateBatch(), {});
    expect(none.mix.epsilonSource.kind).toBe('none');
    expect(none.mix.mixtures.every((m) => m.productM === null && m.ice.length === 0)).toBe(true);
    expect(none.mix.warnings).toEqual([none.mix.epsilonSource.note]);
  });

  it('leaves out a mixture whose recipe cannot be read, with a warning', () => {
    const batch = ironThiocyanateBatch([1, 2]);
    batch.samples[2] = { ...batch.samples[2], volumeAMl: undefined };
    const r = runToMixtures(batch);
    expect(r.mix.mixtures.map((m) => m.sampleId)).toEqual(['M2']);
    expect(r.mix.warnings).toHaveLength(1);
    expect(r.mix.warnings[0]).toMatch(/^mixture M1: .*; not analysed$/);
    expect(r.mix.measurements).toHaveLength(1);
  });

  it('parses the candidates of the settings', () => {
    const r = analyseMixtures([], null, resolveAnalysisSettings({ candidates: ['2:1', '1:1'] }));
    expect(r.candidates.map((c) => [c.label, c.a, c.b])).toEqual([
      ['2:1', 2, 1],
      ['1:1', 1, 1],
    ]);
    expect(r.mixtures).toEqual([]);
    expect(r.warnings).toEqual([]);
  });
});
