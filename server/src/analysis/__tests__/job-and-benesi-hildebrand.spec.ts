import { benesiHildebrand } from '../benesi-hildebrand';
import { solveEquilibrium } from '../equilibrium-solve';
import { jobAnalysis } from '../job';
import { findJobSeries } from '../job-series';
import { parseStoichiometry } from '../stoichiometry-model';
import { readJson } from './reference-data';

interface JobFacts {
  jobs_method_max_mole_fraction: { cases: Record<string, number>; status: string };
}

const facts = readJson<JobFacts>('other_facts.json').jobs_method_max_mole_fraction;

function jobSeries(label: string, dimensionlessK: number, fractions: number[]) {
  const model = parseStoichiometry(label);
  const total = 1e-3;
  const k = dimensionlessK / total ** (model.a + model.b - 1);
  return fractions.map((x) => ({
    moleFractionB: x,
    absorbance: 4700 * solveEquilibrium(k, (1 - x) * total, x * total, model).productM,
  }));
}

describe("Job's method", () => {
  // Source: mathematical fact x_B = b/(a+b) (shared/reference/other_facts.json jobs_method_max_mole_fraction,
  // status "mathematical fact; verified numerically for finite K").
  const grid = Array.from({ length: 19 }, (_, i) => (i + 1) / 20);
  it.each([
    ['1:1', 'M:L 1:1'],
    ['1:2', 'M:L 1:2'],
    ['2:1', 'M:L 2:1'],
    ['1:3', 'M:L 1:3'],
  ])('%s: the branches meet at the tabulated mole fraction (strong binding)', (label) => {
    const expected = facts.cases[label] ?? facts.cases[`M:L ${label}`];
    const r = jobAnalysis(jobSeries(label, 1e9, grid));
    expect(r.maxMoleFractionB as number).toBeCloseTo(expected, 3);
    expect(r.nearestModel).toBe(label);
  });

  it('the complex itself peaks at b/(a+b) for a finite K (grid maximum, mathematics)', () => {
    const fine = Array.from({ length: 9999 }, (_, i) => (i + 1) / 10000);
    for (const label of ['1:1', '1:2', '2:1']) {
      const pts = jobSeries(label, 100, fine);
      const top = pts.reduce((best, p) => (p.absorbance > best.absorbance ? p : best));
      const m = parseStoichiometry(label);
      expect(top.moleFractionB).toBeCloseTo(m.b / (m.a + m.b), 3);
    }
  });

  it('reports no maximum for a monotonic series instead of guessing', () => {
    const r = jobAnalysis([0.1, 0.3, 0.5, 0.7, 0.9].map((x) => ({ moleFractionB: x, absorbance: x })));
    expect(r.maxMoleFractionB).toBeNull();
  });

  it('finds the mixtures of constant total concentration', () => {
    const mixtures = [
      ...[0.2, 0.4, 0.5, 0.6, 0.8].map((x) => ({ a0M: (1 - x) * 1e-3, b0M: x * 1e-3 })),
      { a0M: 2e-4, b0M: 5e-3 },
      { a0M: 2e-4, b0M: 8e-3 },
    ];
    expect(findJobSeries(mixtures)).toEqual([0, 1, 2, 3, 4]);
    expect(findJobSeries(mixtures.slice(4))).toEqual([]);
  });
});

describe('Benesi–Hildebrand', () => {
  it('recovers K exactly when the excess reactant is truly free (double-reciprocal identity)', () => {
    // 1/A = 1/(ε·l·A₀) + 1/(K·ε·l·A₀·[B]) holds exactly with [B] free: Benesi & Hildebrand (1949).
    const pts = [1e-2, 2e-2, 4e-2, 8e-2].map((b0M) => ({
      a0M: 1e-4,
      b0M,
      pathLengthCm: 1,
      absorbance: (4700 * 1e-4 * 100 * b0M) / (1 + 100 * b0M),
    }));
    const r = benesiHildebrand(pts);
    expect(r?.k as number).toBeCloseTo(100, 8);
    expect(r?.epsilonLPerMolCm as number).toBeCloseTo(4700, 6);
  });

  it('approaches the exact K as the excess grows (cross-check of the approximation)', () => {
    const model = parseStoichiometry('1:1');
    const errorAt = (ratio: number): number => {
      const pts = [1, 1.5, 2, 3, 4].map((f) => {
        const b0M = ratio * f * 1e-4;
        return {
          a0M: 1e-4,
          b0M,
          pathLengthCm: 1,
          absorbance: 4700 * solveEquilibrium(500, 1e-4, b0M, model).productM,
        };
      });
      return Math.abs((benesiHildebrand(pts)?.k as number) - 500) / 500;
    };
    expect(errorAt(100)).toBeLessThan(errorAt(10));
    expect(errorAt(100)).toBeLessThan(0.02);
  });
});
