import { planMixtures, planWellMixtures } from '../planner';

/**
 * The µL plan for plate wells. Outside check: the dilution identity C₁V₁ = C₂V₂ (amount of substance
 * is conserved on dilution; any general chemistry textbook) — every stock volume times its stock
 * concentration must equal the well's concentration times the fill volume, and the well's volumes
 * must add up to the fill volume. Numbers are invented for the test; the hand-worked well is below.
 *
 * Hand-worked (1:1 Job's series, mole fraction of B 0.5): c_A = 2.000e-3 mol/L, c_B = 5.000e-3 mol/L,
 * V_fill = 200 µL, A₀ + B₀ = 1.000e-3 mol/L → A₀ = B₀ = 5.000e-4 mol/L.
 *   V_A = 5.000e-4 × 200 / 2.000e-3 = 50 µL;  V_B = 5.000e-4 × 200 / 5.000e-3 = 20 µL;
 *   diluent = 200 − 50 − 20 = 130 µL.
 */
const BASE = {
  stockAM: 2.0e-3,
  stockBM: 5.0e-3,
  fillVolumeUl: 200,
  kAssumed: 1000,
  epsilonLPerMolCm: 5000,
  series: {
    kind: 'job' as const,
    totalConcentrationM: 1.0e-3,
    moleFractionsB: [1 / 6, 2 / 6, 3 / 6, 4 / 6, 5 / 6],
  },
};

describe('planWellMixtures (µL for plate wells)', () => {
  it('gives the hand-worked volumes of the 0.5 mixture in µL and mL', () => {
    const m = planWellMixtures(BASE).mixtures[2];
    expect(m.volumeAUl).toBeCloseTo(50, 9);
    expect(m.volumeBUl).toBeCloseTo(20, 9);
    expect(m.diluentUl).toBeCloseTo(130, 9);
    expect(m.volumeAMl).toBeCloseTo(0.05, 12);
  });

  it.each([
    ['no rounding', undefined],
    ['rounded to 1 µL', 1],
    ['rounded to 0.5 µL', 0.5],
  ])('volumes sum to the fill volume and follow C₁V₁ = C₂V₂ (%s)', (_name, step) => {
    const plan = planWellMixtures({ ...BASE, volumeStepUl: step });
    expect(plan.fillVolumeUl).toBe(200);
    for (const m of plan.mixtures) {
      expect(m.volumeAUl + m.volumeBUl + m.diluentUl).toBeCloseTo(200, 9);
      expect(m.diluentUl).toBeGreaterThanOrEqual(0);
      // C₁V₁ = C₂V₂ for each stock: c_stock × V_stock = c_well × V_fill (both in mol/L × µL).
      expect(BASE.stockAM * m.volumeAUl).toBeCloseTo(m.a0M * 200, 12);
      expect(BASE.stockBM * m.volumeBUl).toBeCloseTo(m.b0M * 200, 12);
      if (step) {
        expect(Math.abs(m.volumeAUl / step - Math.round(m.volumeAUl / step))).toBeLessThan(1e-9);
        expect(Math.abs(m.volumeBUl / step - Math.round(m.volumeBUl / step))).toBeLessThan(1e-9);
      }
    }
  });

  it('predicts the same concentrations and absorbances as the same plan in mL', () => {
    const wells = planWellMixtures(BASE).mixtures;
    const ml = planMixtures({ ...BASE, totalVolumeMl: 0.2 }).mixtures;
    wells.forEach((w, i) => {
      expect(w.a0M).toBeCloseTo(ml[i].a0M, 15);
      expect(w.predictedAbsorbance).toBeCloseTo(ml[i].predictedAbsorbance, 12);
      expect(w.volumeAMl).toBeCloseTo(ml[i].volumeAMl, 12);
    });
  });

  it('warns per well when the predicted absorbance is below the LOQ, and when the stocks overfill it', () => {
    // LOQ 1e-4 mol/L is 0.5 as absorbance at ε = 5000, l = 1 cm.
    const plan = planWellMixtures({ ...BASE, loqM: 1e-4 });
    const below = plan.mixtures.filter((m) => m.productM < 1e-4);
    expect(below.length).toBeGreaterThan(0);
    for (const m of plan.mixtures) {
      const warned = m.warnings.some((w) => /below the LOQ \(0\.500 as absorbance\)/.test(w));
      expect(warned).toBe(m.productM < 1e-4);
    }
    const over = planWellMixtures({ ...BASE, stockAM: 1e-4 });
    expect(over.mixtures[0].warnings.join()).toMatch(/exceed the fill volume/);
  });

  it('refuses a fill volume or step that is not positive', () => {
    expect(() => planWellMixtures({ ...BASE, fillVolumeUl: 0 })).toThrow(/fill volume/);
    expect(() => planWellMixtures({ ...BASE, volumeStepUl: -1 })).toThrow(/volume step/);
  });
});
