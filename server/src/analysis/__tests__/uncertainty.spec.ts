import * as ss from 'simple-statistics';
import { solveEquilibrium } from '../equilibrium-solve';
import { fitEquilibriumModel } from '../global-fit';
import { MixtureMeasurement } from '../mixture-measurement';
import { monteCarloK } from '../monte-carlo';
import { seededRandom } from '../random';
import { parseStoichiometry } from '../stoichiometry-model';
import { propagateKUncertainty } from '../uncertainty-propagation';

const model = parseStoichiometry('1:1');
// Invented series: A 5 mM and B 50 mM stocks made up to 10 mL.
const mixtures: MixtureMeasurement[] = [0.2, 0.4, 0.6, 0.8, 1.2, 1.6, 2.0, 2.4].map((volumeBMl, i) => {
  const a0 = (5e-3 * 0.4) / 10;
  const b0 = (5e-2 * volumeBMl) / 10;
  const noise = [0.001, -0.002, 0.0005, 0.0015, -0.001, 0.002, -0.0005, 0.0][i];
  return {
    stockAM: 5e-3,
    volumeAMl: 0.4,
    stockBM: 5e-2,
    volumeBMl,
    totalVolumeMl: 10,
    pathLengthCm: 1,
    absorbance: 1250 * solveEquilibrium(850, a0, b0, model).productM + noise,
  };
});
const points = mixtures.map((m) => ({
  a0M: (m.stockAM * m.volumeAMl) / 10,
  b0M: (m.stockBM * m.volumeBMl) / 10,
  absorbance: m.absorbance,
  pathLengthCm: 1,
}));
const fit = fitEquilibriumModel(points, model);
const u = { pipetteRelSd: 0.0055, flaskRelSd: 0.0012, stockRelSd: 0.005, absorbanceSd: 0.002 };

describe('uncertainty of K', () => {
  it('seeded Monte Carlo is reproducible and differs with another seed (JCGM 101)', () => {
    const a = monteCarloK(mixtures, model, fit, u, 300, 42);
    const b = monteCarloK(mixtures, model, fit, u, 300, 42);
    const c = monteCarloK(mixtures, model, fit, u, 300, 43);
    expect(a).toEqual(b);
    expect(a?.kCi95).not.toEqual(c?.kCi95);
    expect(a?.failed).toBe(0);
    const [lo, hi] = a?.kCi95 as [number, number];
    expect(lo).toBeLessThan(fit.k as number);
    expect(hi).toBeGreaterThan(fit.k as number);
  });

  it('first-order propagation agrees with Monte Carlo for small input errors (GUM vs GUM-S1)', () => {
    const lin = propagateKUncertainty(mixtures, model, fit, u);
    const mc = monteCarloK(mixtures, model, fit, u, 2000, 7);
    expect(lin).not.toBeNull();
    expect(Math.abs((lin?.lnKSd as number) / (mc?.lnKSd as number) - 1)).toBeLessThan(0.1);
    const shares = lin?.contributions as Record<string, number>;
    expect(Object.values(shares).reduce((s, v) => s + v, 0)).toBeCloseTo(1, 12);
  });

  it('absorbance noise alone reproduces the fit’s own standard error of ln K', () => {
    const lin = propagateKUncertainty(mixtures, model, fit, {
      pipetteRelSd: 0,
      flaskRelSd: 0,
      stockRelSd: 0,
      absorbanceSd: null,
    });
    expect(lin?.lnKSd as number).toBeCloseTo((fit.log10KSe as number) * Math.LN10, 6);
  });

  it('the seeded normal generator has mean 0 and SD 1 (checked with simple-statistics)', () => {
    const rng = seededRandom(123);
    const v = Array.from({ length: 20000 }, () => rng.normal());
    expect(Math.abs(ss.mean(v))).toBeLessThan(0.03);
    expect(ss.sampleStandardDeviation(v)).toBeCloseTo(1, 1);
    expect(Math.abs(ss.sampleSkewness(v))).toBeLessThan(0.05);
  });
});
