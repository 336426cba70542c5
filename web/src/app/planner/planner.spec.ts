import { planMixtures } from '@equilight/analysis';
import { type PlannerSettings, freePositions, manifestCsv, planRows, plannerInput } from './mixture-plan';

/**
 * Hand-worked example (1:1), numbers invented for this test and worked out by hand.
 *
 * Stocks: A = B = 2.000 × 10⁻³ mol/L. Every mixture is made up to V_T = 10.00 mL.
 * Job's series of 4 mixtures at A₀ + B₀ = 1.000 × 10⁻³ mol/L: mole fractions of B are 0.2, 0.4, 0.6, 0.8.
 * Assumed 1:1 complex with K = 1000 L/mol, ε = 5000 L·mol⁻¹·cm⁻¹, path length l = 1.000 cm.
 *
 * Mixture 2 (mole fraction of B 0.4):
 *   A₀ = 0.6 × 1.000e-3 = 6.000e-4 mol/L,  B₀ = 0.4 × 1.000e-3 = 4.000e-4 mol/L
 *   Dilution C₁V₁ = C₂V₂:  V_A = A₀·V_T / c_A = 6.000e-4 × 10.00 / 2.000e-3 = 3.000 mL
 *                          V_B = B₀·V_T / c_B = 4.000e-4 × 10.00 / 2.000e-3 = 2.000 mL
 *                          diluent = 10.00 − 3.000 − 2.000 = 5.000 mL
 *   1:1 quadratic, x = [(A₀ + B₀ + 1/K) − √((A₀ + B₀ + 1/K)² − 4·A₀·B₀)] / 2:
 *     s = 6.000e-4 + 4.000e-4 + 1.000e-3 = 2.000e-3
 *     s² = 4.000e-6;  4·A₀·B₀ = 4 × 6.000e-4 × 4.000e-4 = 9.600e-7
 *     √(4.000e-6 − 9.600e-7) = √(3.040e-6) = 1.7436e-3
 *     x = (2.000e-3 − 1.7436e-3) / 2 = 1.2822e-4 mol/L
 *   A = ε·l·x = 5000 × 1.000 × 1.2822e-4 = 0.6411
 *
 * Mixture 1 (mole fraction of B 0.2): A₀ = 8.000e-4, B₀ = 2.000e-4 mol/L
 *   V_A = 4.000 mL, V_B = 1.000 mL, diluent = 5.000 mL
 *   s = 2.000e-3;  4·A₀·B₀ = 6.400e-7;  √(4.000e-6 − 6.400e-7) = √(3.360e-6) = 1.8330e-3
 *   x = (2.000e-3 − 1.8330e-3) / 2 = 8.349e-5 mol/L  (carrying one more digit: 8.3485e-5)
 *   A = 5000 × 8.3485e-5 = 0.4174
 *
 * Mixture 3 (0.6) mirrors mixture 2 for a 1:1 complex: A₀ and B₀ swap, x and A are the same (0.6411);
 * V_A = 2.000 mL, V_B = 3.000 mL.
 *
 * Fixed A with rising B, A₀ = 1.000e-4 mol/L, B₀/A₀ = 2 (same stocks, K, ε, l):
 *   B₀ = 2.000e-4 mol/L;  V_A = 1.000e-4 × 10.00 / 2.000e-3 = 0.5000 mL;  V_B = 1.000 mL;  diluent = 8.500 mL
 *   s = 1.000e-4 + 2.000e-4 + 1.000e-3 = 1.300e-3;  s² = 1.690e-6;  4·A₀·B₀ = 8.000e-8
 *   √(1.690e-6 − 8.000e-8) = √(1.610e-6) = 1.2689e-3  (1.26886e-3)
 *   x = (1.300e-3 − 1.26886e-3) / 2 = 1.5571e-5 mol/L;  A = 5000 × 1.5571e-5 = 0.07786
 */
const HAND_WORKED: PlannerSettings = {
  stockAM: 2.0e-3,
  stockBM: 2.0e-3,
  totalVolumeMl: 10,
  series: 'job',
  mixtureCount: 4,
  totalConcentrationM: 1.0e-3,
  fixedAM: 1.0e-4,
  firstRatioBToA: 2,
  lastRatioBToA: 2,
  stoichiometry: '1:1',
  kAssumed: 1000,
  epsilonLPerMolCm: 5000,
  pathLengthCm: 1,
  linearRangeMaxAbsorbance: 1,
  loqM: null,
  volumeStepMl: 0,
};

/** Relative closeness, for values worked out by hand to about four significant figures. */
function expectWithin(actual: number, expected: number, relative: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(Math.abs(expected) * relative);
}

const FOUR_FIGURES = 1e-3; // hand values carry 4–5 significant figures
const VOLUME_ML = 1e-9; // volumes are exact arithmetic

describe('mixture planner: hand-worked example (1:1)', () => {
  const { rows } = planRows(HAND_WORKED, 'cuvette', 'mix');

  it('gives the mole fractions 0.2, 0.4, 0.6, 0.8 on cuvettes C1…C4', () => {
    expect(rows.map((r) => r.position)).toEqual(['C1', 'C2', 'C3', 'C4']);
    rows.forEach((r, i) => expectWithin(r.moleFractionB, [0.2, 0.4, 0.6, 0.8][i], 1e-12));
  });

  it('pipettes by C1V1 = C2V2 (hand-worked volumes)', () => {
    const [m1, m2, m3] = rows.map((r) => r.mixture);
    expect(m1.volumeAMl).toBeCloseTo(4.0, 9);
    expect(m1.volumeBMl).toBeCloseTo(1.0, 9);
    expect(m2.volumeAMl).toBeCloseTo(3.0, 9);
    expect(m2.volumeBMl).toBeCloseTo(2.0, 9);
    expect(m2.diluentMl).toBeCloseTo(5.0, 9);
    expect(m3.volumeAMl).toBeCloseTo(2.0, 9);
    expect(m3.volumeBMl).toBeCloseTo(3.0, 9);
    expectWithin(m2.a0M, 6.0e-4, 1e-12);
    expectWithin(m2.b0M, 4.0e-4, 1e-12);
  });

  it('predicts the hand-worked complex concentrations and absorbances', () => {
    const [m1, m2, m3] = rows.map((r) => r.mixture);
    expectWithin(m2.productM, 1.2822e-4, FOUR_FIGURES);
    expectWithin(m2.predictedAbsorbance, 0.6411, FOUR_FIGURES);
    expectWithin(m1.productM, 8.3485e-5, FOUR_FIGURES);
    expectWithin(m1.predictedAbsorbance, 0.4174, FOUR_FIGURES);
    expectWithin(m3.predictedAbsorbance, 0.6411, FOUR_FIGURES);
  });

  it('predicts the hand-worked fixed-A mixture', () => {
    const [row] = planRows({ ...HAND_WORKED, series: 'excess', mixtureCount: 1 }, 'cuvette', 'mix').rows;
    expect(row.mixture.volumeAMl).toBeCloseTo(0.5, 9);
    expect(row.mixture.volumeBMl).toBeCloseTo(1.0, 9);
    expect(row.mixture.diluentMl).toBeCloseTo(8.5, 9);
    expectWithin(row.mixture.productM, 1.5571e-5, FOUR_FIGURES);
    expectWithin(row.mixture.predictedAbsorbance, 0.07786, FOUR_FIGURES);
  });

  it('matches the analysis module called directly', () => {
    const direct = planMixtures(plannerInput(HAND_WORKED)).mixtures;
    rows.forEach((r, i) => {
      expect(r.mixture.predictedAbsorbance).toBe(direct[i].predictedAbsorbance);
      expect(r.mixture.volumeAMl).toBe(direct[i].volumeAMl);
    });
  });
});

describe('mixture planner: volumes add up to the total volume', () => {
  const cases: [string, PlannerSettings][] = [
    ['Job series, unequal stocks, 9 mixtures', { ...HAND_WORKED, stockBM: 5e-3, mixtureCount: 9 }],
    ['Job series rounded to 0.01 mL', { ...HAND_WORKED, stockAM: 3e-3, mixtureCount: 7, volumeStepMl: 0.01 }],
    [
      'fixed A, rising B, 1:2 model',
      {
        ...HAND_WORKED,
        series: 'excess',
        mixtureCount: 8,
        firstRatioBToA: 0.5,
        lastRatioBToA: 8,
        stoichiometry: '1:2',
        kAssumed: 1e6,
      },
    ],
  ];
  it.each(cases)('%s', (_name, settings) => {
    for (const { mixture } of planRows(settings, 'plate96', 'mix').rows) {
      const sum = mixture.volumeAMl + mixture.volumeBMl + mixture.diluentMl;
      expect(Math.abs(sum - settings.totalVolumeMl)).toBeLessThanOrEqual(VOLUME_ML);
      expect(mixture.diluentMl).toBeGreaterThanOrEqual(0);
    }
  });
});

describe('mixture planner: flags and manifest CSV', () => {
  it('flags mixtures above the linear range and below the LOQ', () => {
    const { rows } = planRows(
      { ...HAND_WORKED, linearRangeMaxAbsorbance: 0.5, loqM: 1e-4 },
      'cuvette',
      'mix',
    );
    expect(rows.map((r) => r.aboveLinearRange)).toEqual([false, true, true, false]);
    expect(rows.map((r) => r.belowLoq)).toEqual([true, false, false, true]);
  });

  it('flags mixtures whose stock volumes exceed the total volume', () => {
    const { rows } = planRows({ ...HAND_WORKED, stockAM: 5e-4 }, 'cuvette', 'mix');
    expect(rows[0].cannotBeMade).toBe(true); // needs 16 mL of stock A in 10 mL
  });

  it('numbers plate positions row by row', () => {
    const { rows } = planRows({ ...HAND_WORKED, mixtureCount: 14 }, 'plate96', 'mix');
    expect(rows.map((r) => r.position).slice(10, 14)).toEqual(['A11', 'A12', 'B1', 'B2']);
  });

  it('writes the manifest columns with one mixture per line', () => {
    const { rows } = planRows(HAND_WORKED, 'cuvette', 'mix');
    expect(manifestCsv(rows, HAND_WORKED).split('\r\n')).toEqual([
      'position,sample_id,role,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL',
      'C1,mix-01,mixture,0.002,4,0.002,1,10',
      'C2,mix-02,mixture,0.002,3,0.002,2,10',
      'C3,mix-03,mixture,0.002,2,0.002,3,10',
      'C4,mix-04,mixture,0.002,1,0.002,4,10',
      '',
    ]);
  });
});

describe('mixture planner: plate wells in µL on a layout’s free positions', () => {
  const occupied = [
    { position: 'A1' },
    { position: 'A2' },
    { position: 'a3' }, // positions compare without regard to case
    { position: 'B1' },
  ];

  it('lists the positions no sample role occupies, row by row', () => {
    const free = freePositions('96', null, occupied);
    expect(free).toHaveLength(92);
    expect(free.slice(0, 10)).toEqual(['A4', 'A5', 'A6', 'A7', 'A8', 'A9', 'A10', 'A11', 'A12', 'B2']);
    expect(freePositions('cuvette', 5, [{ position: 'C2' }])).toEqual(['C1', 'C3', 'C4', 'C5']);
    expect(freePositions('384', null, [])).toHaveLength(384);
  });

  it('plans µL to the fill volume on the free positions (C₁V₁ = C₂V₂, hand-worked)', () => {
    // Same series as the hand-worked example, in 200 µL wells: V_A = 6.000e-4 × 200 / 2.000e-3 = 60 µL,
    // V_B = 4.000e-4 × 200 / 2.000e-3 = 40 µL, diluent 100 µL for mixture 2.
    const wells = { positions: freePositions('96', null, occupied), fillVolumeUl: 200, volumeStepUl: 1 };
    const { rows } = planRows(HAND_WORKED, 'plate96', 'mix', wells);
    expect(rows.map((r) => r.position)).toEqual(['A4', 'A5', 'A6', 'A7']);
    expect(rows.every((r) => r.volumeUnit === 'µL')).toBe(true);
    expect(rows[1].volumes).toEqual({ a: 60, b: 40, diluent: 100, total: 200 });
    for (const r of rows) {
      expect(r.volumes.a + r.volumes.b + r.volumes.diluent).toBeCloseTo(200, 9);
      expect(HAND_WORKED.stockAM * r.volumes.a).toBeCloseTo(r.mixture.a0M * 200, 12);
    }
    // Concentrations and absorbances do not depend on the volume scale.
    expectWithin(rows[1].mixture.predictedAbsorbance, 0.6411, FOUR_FIGURES);
    // The manifest keeps its mL columns.
    expect(manifestCsv(rows, HAND_WORKED).split('\r\n')[2]).toBe(
      'A5,mix-02,mixture,0.002,0.06,0.002,0.04,0.2',
    );
  });

  it('refuses more mixtures than free positions', () => {
    const wells = { positions: ['H11', 'H12'], fillVolumeUl: 200, volumeStepUl: 0 };
    expect(() => planRows(HAND_WORKED, 'plate96', 'mix', wells)).toThrow(
      /2 free position\(s\) for 4 mixtures/,
    );
  });

  it('flags a well whose stocks exceed the fill volume', () => {
    const wells = { positions: freePositions('96', null, []), fillVolumeUl: 200, volumeStepUl: 0 };
    const { rows } = planRows({ ...HAND_WORKED, stockAM: 5e-4 }, 'plate96', 'mix', wells);
    expect(rows[0].cannotBeMade).toBe(true); // 8e-4 × 200 / 5e-4 = 320 µL of stock A in 200 µL
  });
});
