import { SingularValueDecomposition } from 'ml-matrix';
import { seededRandom } from '../random';
import { estimateSpeciesCount, gavishDonohoLambda, gavishDonohoOmega } from '../spectral-species-count';
import { design, grid, synthesise } from './spectral-synthetic';

/** Median of the Marchenko–Pastur law with ratio β (unit variance), by quadrature and bisection. */
function marchenkoPasturMedian(beta: number): number {
  const lo = (1 - Math.sqrt(beta)) ** 2;
  const hi = (1 + Math.sqrt(beta)) ** 2;
  // x = lo + (hi − lo)(1 − cos t)/2 removes the square-root ends: density·dx = ((hi − lo)/2)² sin²t / (2πβx) dt.
  const x = (t: number): number => lo + (hi - lo) * Math.sin(t / 2) ** 2;
  const g = (t: number): number => (((hi - lo) / 2) ** 2 * Math.sin(t) ** 2) / (2 * Math.PI * beta * x(t));
  const mass = (tEnd: number): number => {
    // Midpoint rule: never evaluates the removable 0/0 at t = 0 (β = 1).
    const steps = 4000;
    const h = tEnd / steps;
    let sum = 0;
    for (let i = 0; i < steps; i++) sum += g((i + 0.5) * h);
    return sum * h;
  };
  let a = 0;
  let b = Math.PI;
  for (let i = 0; i < 60; i++) {
    const mid = (a + b) / 2;
    if (mass(mid) < 0.5) a = mid;
    else b = mid;
  }
  return x((a + b) / 2);
}

describe('singular values (ml-matrix SVD against a hand-known case)', () => {
  it('a·bᵀ + c·dᵀ with a ⊥ c and b ⊥ d has singular values ‖a‖‖b‖ and ‖c‖‖d‖ (mathematical fact)', () => {
    // Source: the SVD's definition (Golub & Van Loan, Matrix Computations, 4th ed., Thm 2.4.1): the sum of two
    // rank-one terms with orthogonal left and orthogonal right factors is already an SVD.
    const a = [1, 1, 1, 1];
    const c = [1, -1, 1, -1];
    const b = [1, 2, 3, 0, 0];
    const d = [3, 0, -1, 5, 1];
    const m = a.map((ai, i) => b.map((bj, j) => ai * bj + c[i] * d[j]));
    const r = estimateSpeciesCount(m, { absorbanceSd: 1e-9 });
    expect(r.singularValues[0]).toBeCloseTo(2 * 6, 12); // ‖c‖‖d‖ = 2·6
    expect(r.singularValues[1]).toBeCloseTo(2 * Math.sqrt(14), 12); // ‖a‖‖b‖ = 2·√14
    expect(r.singularValues[2]).toBeLessThan(1e-14);
    expect(r.speciesCount).toBe(2);
  });
});

describe('Gavish–Donoho thresholds', () => {
  it('λ*(1) = 4/√3, the value in the paper’s title (Gavish & Donoho 2014)', () => {
    expect(gavishDonohoLambda(1)).toBeCloseTo(4 / Math.sqrt(3), 12);
  });

  it('ω(1) ≈ 2.858 (Gavish & Donoho 2014, square matrices; from memory)', () => {
    expect(gavishDonohoOmega(1)).toBeCloseTo(2.858, 2);
  });

  it.each([0.1, 0.133, 0.25, 0.5, 1])(
    'β = %s: the cubic ω(β) stands for λ*(β)/√μ_β, μ_β the Marchenko–Pastur median (quadrature here)',
    (beta) => {
      // Source: Marchenko V.A. & Pastur L.A. (1967), density √((β₊ − x)(x − β₋))/(2πβx) on [β₋, β₊].
      const exact = gavishDonohoLambda(beta) / Math.sqrt(marchenkoPasturMedian(beta));
      expect(Math.abs(gavishDonohoOmega(beta) - exact) / exact).toBeLessThan(0.01);
    },
  );
});

describe('pure noise (seeded Gaussian, 40 × 301)', () => {
  const sd = 0.002;
  const rng = seededRandom(7);
  const noise = Array.from({ length: 40 }, () => Array.from({ length: 301 }, () => sd * rng.normal()));

  it('the largest singular value is at the Marchenko–Pastur edge σ(√m + √n) (Geman 1980)', () => {
    // Source: Geman S. (1980) Ann. Probab. 8, 252: s₁/(σ(√m + √n)) → 1 for i.i.d. entries.
    const s1 = estimateSpeciesCount(noise, { absorbanceSd: sd }).singularValues[0];
    const edge = sd * (Math.sqrt(40) + Math.sqrt(301));
    expect(s1 / edge).toBeGreaterThan(0.93);
    expect(s1 / edge).toBeLessThan(1.05);
  });

  it('counts no species, with σ given or estimated, and estimates σ within 5 %', () => {
    expect(estimateSpeciesCount(noise, { absorbanceSd: sd }).speciesCount).toBe(0);
    const est = estimateSpeciesCount(noise);
    expect(est.speciesCount).toBe(0);
    expect(est.noiseSource).toBe('estimated');
    expect(Math.abs(est.noiseSd - sd) / sd).toBeLessThan(0.05);
  });

  it('agrees with ml-matrix’s own SVD of the transposed matrix (the same singular values)', () => {
    const t = noise[0].map((_, j) => noise.map((row) => row[j]));
    const direct = new SingularValueDecomposition(t).diagonal.sort((u, v) => v - u);
    estimateSpeciesCount(noise).singularValues.forEach((v, i) => expect(v).toBeCloseTo(direct[i], 12));
  });
});

describe('number of absorbing species (invented spectra, 40 mixtures × 301 wavelengths)', () => {
  const wl = grid();
  const mixtures = design();
  it.each([
    [2, false],
    [3, true],
  ])('%s absorbers: right without noise, with σ given and with σ estimated', (count, aAbsorbs) => {
    const clean = synthesise(mixtures, wl, '1:1', 800, { aAbsorbs });
    expect(estimateSpeciesCount(clean).speciesCount).toBe(count);
    for (const seed of [1, 2, 3]) {
      const noisy = synthesise(mixtures, wl, '1:1', 800, { aAbsorbs, noiseSd: 0.002, seed });
      expect(estimateSpeciesCount(noisy, { absorbanceSd: 0.002 }).speciesCount).toBe(count);
      const est = estimateSpeciesCount(noisy);
      expect(est.speciesCount).toBe(count);
      expect(Math.abs(est.noiseSd - 0.002) / 0.002).toBeLessThan(0.05);
    }
  });

  it('also for a 1:2 complex', () => {
    const noisy = synthesise(mixtures, wl, '1:2', 2e6, { noiseSd: 0.002, seed: 4 });
    expect(estimateSpeciesCount(noisy, { absorbanceSd: 0.002 }).speciesCount).toBe(3);
  });

  it('warns when the estimate rests on too few mixtures', () => {
    const few = synthesise(design(3, 2), wl, '1:1', 800, { noiseSd: 0.002 });
    expect(estimateSpeciesCount(few).warnings.join(' ')).toMatch(/give the absorbance SD/);
  });
});

describe('bad input', () => {
  it('refuses an empty, ragged or gappy matrix and a negative SD', () => {
    expect(() => estimateSpeciesCount([])).toThrow(/empty/);
    expect(() => estimateSpeciesCount([[1, 2], [3]])).toThrow(/every wavelength/);
    expect(() => estimateSpeciesCount([[1, NaN]])).toThrow(/gap/);
    expect(() => estimateSpeciesCount([[1, 2]], { absorbanceSd: -1 })).toThrow(/SD/);
  });
});
