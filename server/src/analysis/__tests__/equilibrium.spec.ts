import fc from 'fast-check';
import { mixtureInitialConcentrations } from '../dilution';
import { solveOneToOne } from '../equilibrium-one-to-one';
import { equilibriumSensitivity, solveEquilibrium } from '../equilibrium-solve';
import { iceTable } from '../ice-table';
import { findRootBracketed } from '../root-finding';
import { parseStoichiometry } from '../stoichiometry-model';

const ONE_ONE = parseStoichiometry('1:1');
const conc = fc.double({ min: 1e-7, max: 1e-1, noNaN: true });
const logK = fc.double({ min: -1, max: 9, noNaN: true });

describe('equilibrium solver', () => {
  it('1:1 closed form agrees with the bracketed root finder (property)', () => {
    fc.assert(
      fc.property(conc, conc, logK, (a0, b0, lk) => {
        const k = 10 ** lk;
        const closed = solveOneToOne(k, a0, b0);
        const root = solveEquilibrium(k, a0, b0, ONE_ONE, { method: 'root' });
        expect(root.converged).toBe(true);
        expect(Math.abs(root.productM - closed)).toBeLessThanOrEqual(1e-12 * Math.min(a0, b0));
      }),
      { seed: 11, numRuns: 300 },
    );
  });

  it.each(['1:1', '1:2', '2:1', '1:3'])(
    '%s: the solution obeys the mass-action law and mass balance',
    (label) => {
      const model = parseStoichiometry(label);
      fc.assert(
        fc.property(conc, conc, fc.double({ min: 0, max: 6, noNaN: true }), (a0, b0, lu) => {
          const k = 10 ** lu / Math.max(a0, b0) ** (model.a + model.b - 1);
          const s = solveEquilibrium(k, a0, b0, model);
          expect(s.converged).toBe(true);
          // Mass action in log form, where the solver works: relative 1e-9 unless a free concentration is lost to rounding.
          const free = Math.min(s.aFreeM / a0, s.bFreeM / b0);
          fc.pre(free > 1e-6);
          const lhs = Math.log(s.productM);
          const rhs = Math.log(k) + model.a * Math.log(s.aFreeM) + model.b * Math.log(s.bFreeM);
          expect(Math.abs(lhs - rhs)).toBeLessThanOrEqual(1e-8);
        }),
        { seed: 3, numRuns: 200 },
      );
    },
  );

  it('never gives a negative concentration (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: -5, max: 15, noNaN: true }),
        fc.constantFrom('1:1', '1:2', '2:1', '1:3'),
        (a0, b0, lk, label) => {
          const model = parseStoichiometry(label);
          const s = solveEquilibrium(10 ** lk, a0, b0, model);
          expect(s.productM).toBeGreaterThanOrEqual(0);
          expect(s.aFreeM).toBeGreaterThanOrEqual(0);
          expect(s.bFreeM).toBeGreaterThanOrEqual(0);
          expect(s.productM).toBeLessThanOrEqual(Math.min(a0 / model.a, b0 / model.b) * (1 + 1e-15));
        },
      ),
      { seed: 5, numRuns: 300 },
    );
  });

  it('handles the limits K → 0, K → ∞ and an absent reactant', () => {
    expect(solveEquilibrium(Infinity, 1e-3, 5e-4, ONE_ONE).productM).toBe(5e-4);
    expect(solveEquilibrium(0, 1e-3, 5e-4, ONE_ONE).productM).toBe(0);
    expect(solveEquilibrium(1e5, 0, 5e-4, parseStoichiometry('1:2')).productM).toBe(0);
  });

  it('sensitivities match central differences', () => {
    const model = parseStoichiometry('1:2');
    const k = 2e6;
    const s = solveEquilibrium(k, 4e-4, 9e-4, model);
    const sens = equilibriumSensitivity(s, model);
    const h = 1e-6;
    const dLnK =
      (solveEquilibrium(k * Math.exp(h), 4e-4, 9e-4, model).productM -
        solveEquilibrium(k * Math.exp(-h), 4e-4, 9e-4, model).productM) /
      (2 * h);
    const dA0 =
      (solveEquilibrium(k, 4e-4 * (1 + h), 9e-4, model).productM -
        solveEquilibrium(k, 4e-4 * (1 - h), 9e-4, model).productM) /
      (2 * h * 4e-4);
    expect(sens.dProductDLnK).toBeCloseTo(dLnK, 9);
    expect(sens.dProductDA0 / dA0).toBeCloseTo(1, 6);
  });

  it('the root finder reports non-convergence at its iteration limit', () => {
    const r = findRootBracketed((x) => [Math.atan(x - 0.3), 1e-12], 0, 1, 0.9, {
      maxIterations: 3,
      tolerance: 1e-16,
    });
    expect(r.converged).toBe(false);
    expect(findRootBracketed((x) => [x * x - 2, 2 * x], 0, 2, 1).root).toBeCloseTo(Math.SQRT2, 14);
  });
});

describe('ICE table and dilution', () => {
  it('computes K = x/([A][B]) and flags a candidate that would need a negative reactant', () => {
    const row = iceTable(1e-3, 2e-4, 1.5e-4, ONE_ONE);
    expect(row.k).toBeCloseTo(1.5e-4 / (8.5e-4 * 5e-5), 8);
    const bad = iceTable(1e-3, 2e-4, 1.5e-4, parseStoichiometry('1:2'));
    expect(bad.feasible).toBe(false);
    expect(bad.k).toBeNull();
    expect(bad.bFreeM).toBeCloseTo(-1e-4, 15);
  });

  it('applies C₁V₁ = C₂V₂ and rejects impossible recipes', () => {
    const c = mixtureInitialConcentrations({
      stockAM: 2e-3,
      volumeAMl: 2,
      stockBM: 2e-3,
      volumeBMl: 3,
      totalVolumeMl: 10,
    });
    expect(c.a0M).toBeCloseTo(4e-4, 18);
    expect(c.b0M).toBeCloseTo(6e-4, 18);
    expect(
      mixtureInitialConcentrations({ stockAM: 1e-3, volumeAMl: 1, stockBM: 1e-3, volumeBMl: 1 }).a0M,
    ).toBe(5e-4);
    expect(() =>
      mixtureInitialConcentrations({
        stockAM: 1e-3,
        volumeAMl: 6,
        stockBM: 1e-3,
        volumeBMl: 6,
        totalVolumeMl: 10,
      }),
    ).toThrow(/exceed/);
  });

  it('per-mixture K is invariant to scaling all volumes by the same factor (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 4, noNaN: true }),
        fc.double({ min: 0.05, max: 4, noNaN: true }),
        fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
        (va, vb, scale) => {
          const recipe = { stockAM: 5e-3, volumeAMl: va, stockBM: 5e-3, volumeBMl: vb, totalVolumeMl: 10 };
          const scaled = {
            ...recipe,
            volumeAMl: va * scale,
            volumeBMl: vb * scale,
            totalVolumeMl: 10 * scale,
          };
          const c1 = mixtureInitialConcentrations(recipe);
          const c2 = mixtureInitialConcentrations(scaled);
          const x = 0.3 * Math.min(c1.a0M, c1.b0M);
          const k1 = iceTable(c1.a0M, c1.b0M, x, ONE_ONE).k as number;
          const k2 = iceTable(c2.a0M, c2.b0M, x, ONE_ONE).k as number;
          expect(Math.abs(k2 - k1) / k1).toBeLessThanOrEqual(1e-12);
        },
      ),
      { seed: 9, numRuns: 200 },
    );
  });
});
