import fc from 'fast-check';
import { solveEquilibrium } from '../equilibrium-solve';
import { fitEquilibriumModel, MixturePoint } from '../global-fit';
import { kStatistics } from '../k-statistics';
import { seededRandom } from '../random';
import { parseStoichiometry } from '../stoichiometry-model';
import { rankStoichiometries } from '../stoichiometry-ranking';
import { readJson } from './reference-data';

/** Invented design: a Job's series at 1 mM total plus an excess series at 0.2 mM of A. */
function design(): { a0M: number; b0M: number }[] {
  const pts: { a0M: number; b0M: number }[] = [];
  for (let i = 1; i <= 9; i++) pts.push({ a0M: 1e-3 * (1 - i / 10), b0M: 1e-3 * (i / 10) });
  for (const b0M of [2e-4, 5e-4, 1e-3, 2e-3]) pts.push({ a0M: 2e-4, b0M });
  return pts;
}

function synthesise(label: string, k: number, epsilon: number, noiseSd = 0, seed = 1): MixturePoint[] {
  const model = parseStoichiometry(label);
  const rng = seededRandom(seed);
  return design().map((d) => ({
    ...d,
    pathLengthCm: 1,
    absorbance: epsilon * solveEquilibrium(k, d.a0M, d.b0M, model).productM + noiseSd * rng.normal(),
  }));
}

const TRUE = { '1:1': 500, '1:2': 2e6, '2:1': 3e6 } as const;

describe('global fit round trips (synthetic, noise-free)', () => {
  it.each(Object.entries(TRUE))('%s: recovers K and ε to 1e-9 relative', (label, k) => {
    const fit = fitEquilibriumModel(synthesise(label, k, 4700), parseStoichiometry(label));
    expect(fit.converged).toBe(true);
    expect(Math.abs((fit.k as number) - k) / k).toBeLessThan(1e-9);
    expect(Math.abs((fit.epsilonLPerMolCm as number) - 4700) / 4700).toBeLessThan(1e-9);
  });

  it.each(Object.entries(TRUE))('%s: per-mixture ICE K equals the true K to 1e-9 relative', (label, k) => {
    const model = parseStoichiometry(label);
    const stats = kStatistics(
      design().map((d) => ({ ...d, productM: solveEquilibrium(k, d.a0M, d.b0M, model).productM })),
      model,
    );
    for (const row of stats.rows) expect(Math.abs((row.k as number) - k) / k).toBeLessThan(1e-9);
    expect(stats.kCv as number).toBeLessThan(1e-9);
  });

  it('also fits a baseline offset when asked', () => {
    const pts = synthesise('1:1', 500, 4700).map((p) => ({ ...p, absorbance: p.absorbance + 0.02 }));
    const fit = fitEquilibriumModel(pts, parseStoichiometry('1:1'), { fitBaseline: true });
    expect(fit.baseline as number).toBeCloseTo(0.02, 10);
    expect(Math.abs((fit.k as number) - 500) / 500).toBeLessThan(1e-8);
  });
});

describe('stoichiometry ranking with seeded noise (invented data)', () => {
  it.each(Object.entries(TRUE))('true %s ranks first over 5 noise seeds', (label, k) => {
    for (let seed = 1; seed <= 5; seed++) {
      const pts = synthesise(label, k, 4700, 0.002, seed);
      const evidence = ['1:1', '1:2', '2:1', '1:3'].map((c) => {
        const model = parseStoichiometry(c);
        return {
          model: c,
          kStats: kStatistics(
            pts.map((p) => ({ a0M: p.a0M, b0M: p.b0M, productM: p.absorbance / 4700 })),
            model,
          ),
          fit: fitEquilibriumModel(pts, model),
        };
      });
      const ranking = rankStoichiometries(evidence);
      expect(ranking.best).toBe(label);
      expect(ranking.verdict.startsWith(`${label} fits best`) || ranking.ambiguous).toBe(true);
    }
  });

  it('calls two indistinguishable candidates ambiguous', () => {
    const pts = synthesise('1:1', 500, 4700, 0.002, 3);
    const fit = fitEquilibriumModel(pts, parseStoichiometry('1:1'));
    const twin = { ...fit, model: 'x', aic: (fit.aic as number) + 0.5 };
    const r = rankStoichiometries([
      { model: '1:1', kStats: null, fit },
      { model: '1:2', kStats: null, fit: { ...twin, model: '1:2' } },
    ]);
    expect(r.ambiguous).toBe(true);
    expect(r.verdict).toMatch(/indistinguishable/);
  });

  it('gives a 95 % interval for K that contains the truth', () => {
    const pts = synthesise('1:1', 500, 4700, 0.002, 8);
    const fit = fitEquilibriumModel(pts, parseStoichiometry('1:1'));
    const [lo, hi] = fit.kCi95 as [number, number];
    expect(lo).toBeLessThan(500);
    expect(hi).toBeGreaterThan(500);
    expect(fit.kSe as number).toBeGreaterThan(0);
  });
});

describe('global fit invariants (properties)', () => {
  it('is invariant to the order of the mixtures', () => {
    const base = synthesise('1:2', 2e6, 4700, 0.002, 4);
    const ref = fitEquilibriumModel(base, parseStoichiometry('1:2'));
    fc.assert(
      fc.property(
        fc.shuffledSubarray(base, { minLength: base.length, maxLength: base.length }),
        (shuffled) => {
          const fit = fitEquilibriumModel(shuffled, parseStoichiometry('1:2'));
          expect(Math.abs((fit.k as number) - (ref.k as number)) / (ref.k as number)).toBeLessThan(1e-7);
          expect(fit.rss as number).toBeCloseTo(ref.rss as number, 12);
        },
      ),
      { seed: 21, numRuns: 20 },
    );
  });

  it('K is independent of scaling all volumes (same concentrations, same K)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 100, noNaN: true }), (scale) => {
        const recipes = design().map((d) => ({ va: (d.a0M * 10) / 5e-3, vb: (d.b0M * 10) / 5e-3 }));
        const pts = (s: number): MixturePoint[] =>
          recipes.map((r) => {
            const a0M = (5e-3 * r.va * s) / (10 * s);
            const b0M = (5e-3 * r.vb * s) / (10 * s);
            return {
              a0M,
              b0M,
              pathLengthCm: 1,
              absorbance: 4700 * solveEquilibrium(500, a0M, b0M, parseStoichiometry('1:1')).productM,
            };
          });
        const k1 = fitEquilibriumModel(pts(1), parseStoichiometry('1:1')).k as number;
        const k2 = fitEquilibriumModel(pts(scale), parseStoichiometry('1:1')).k as number;
        expect(Math.abs(k2 - k1) / k1).toBeLessThan(1e-9);
      }),
      { seed: 2, numRuns: 20 },
    );
  });
});

interface ChemRef {
  quantity: string;
  value: number;
  status: string;
}

describe('iron(III)–thiocyanate literature values as the truth of a synthetic set', () => {
  // Source: shared/reference/chemistry_refs.json. K1 = 98 M⁻¹ (25 °C, I = 0.5 M): de Berg, Maeder &
  // Clifford (2016) Inorg. Chim. Acta 445, 155; ε(447 nm) = 4700 L/(mol·cm). Statuses are read from the file.
  const refs = readJson<{ values: ChemRef[] }>('chemistry_refs.json').values;
  const k1 = refs.find((r) => r.quantity === 'K1') as ChemRef;
  const eps = refs.find((r) => r.quantity.startsWith('molar absorptivity of FeSCN2+')) as ChemRef;
  // Fe³⁺ (A) in excess over SCN⁻ (B), as such mixtures are usually made up.
  const fe = [1e-3, 2e-3, 4e-3, 6e-3, 1e-2, 1.5e-2, 2e-2];
  const make = (noiseSd: number): MixturePoint[] => {
    const rng = seededRandom(447);
    return fe.map((a0M) => ({
      a0M,
      b0M: 2e-4,
      pathLengthCm: 1,
      absorbance:
        eps.value * solveEquilibrium(k1.value, a0M, 2e-4, parseStoichiometry('1:1')).productM +
        noiseSd * rng.normal(),
    }));
  };

  it(`recovers K1 = ${k1.value} M⁻¹ [status: ${k1.status}] and ε = ${eps.value} [status: ${eps.status}] exactly without noise`, () => {
    expect(k1.status).toMatch(/confirmed/);
    expect(eps.status).toMatch(/from memory/);
    const fit = fitEquilibriumModel(make(0), parseStoichiometry('1:1'));
    expect(Math.abs((fit.k as number) - k1.value) / k1.value).toBeLessThan(1e-9);
    expect(Math.abs((fit.epsilonLPerMolCm as number) - eps.value) / eps.value).toBeLessThan(1e-9);
  });

  it('recovers them within the fit’s 95 % interval with seeded noise (σ = 0.002)', () => {
    const fit = fitEquilibriumModel(make(0.002), parseStoichiometry('1:1'));
    const [lo, hi] = fit.kCi95 as [number, number];
    expect(lo).toBeLessThan(k1.value);
    expect(hi).toBeGreaterThan(k1.value);
    const [elo, ehi] = fit.epsilonCi95 as [number, number];
    expect(elo).toBeLessThan(eps.value);
    expect(ehi).toBeGreaterThan(eps.value);
  });
});
