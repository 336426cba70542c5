import { solveEquilibrium } from '../equilibrium-solve';
import { fitEquilibriumModel } from '../global-fit';
import { fitSpectralModel } from '../spectral-fit';
import { parseStoichiometry } from '../stoichiometry-model';
import { rankStoichiometries } from '../stoichiometry-ranking';
import { readJson } from './reference-data';
import { design, grid, relativeToPeak, spectra, synthesise } from './spectral-synthetic';

const CANDIDATES = ['1:1', '1:2', '2:1', '1:3'];
const TRUE = { '1:1': 800, '1:2': 2e6 } as const;

describe('noise-free spectra (invented: Gaussian bands, 40 mixtures × 301 wavelengths)', () => {
  const wl = grid();
  const eps = spectra(wl);
  const mixtures = design();

  it.each(Object.entries(TRUE))(
    '%s, A, B and the complex absorbing: K and every spectrum to 1e-6',
    (label, k) => {
      const fit = fitSpectralModel(mixtures, synthesise(mixtures, wl, label, k), parseStoichiometry(label));
      expect(fit.kStatus).toBe('determined');
      expect(Math.abs((fit.k as number) - k) / k).toBeLessThan(1e-6);
      const [a, b, complex] = fit.speciesSpectra;
      expect([a.species, b.species, complex.species]).toEqual(['A', 'B', label === '1:1' ? 'AB' : 'AB₂']);
      expect(relativeToPeak(a.epsilon, eps.a)).toBeLessThan(1e-6);
      expect(relativeToPeak(b.epsilon, eps.b)).toBeLessThan(1e-6);
      expect(relativeToPeak(complex.epsilon, eps.complex)).toBeLessThan(1e-6);
      expect(fit.p).toBe(1 + 3 * 301);
      expect(fit.n).toBe(40 * 301);
      expect(fit.kUnit).toBe(label === '1:1' ? 'L·mol⁻¹' : 'L²·mol⁻²');
      expect(fit.residuals).toHaveLength(40);
      expect(Math.max(...fit.residuals.flat().map(Math.abs))).toBeLessThan(1e-9);
    },
  );

  it.each(Object.entries(TRUE))(
    '%s with A transparent (two absorbers): K and spectra to 1e-6',
    (label, k) => {
      const y = synthesise(mixtures, wl, label, k, { aAbsorbs: false });
      const fit = fitSpectralModel(mixtures, y, parseStoichiometry(label), { reactantA: 'none' });
      expect(Math.abs((fit.k as number) - k) / k).toBeLessThan(1e-6);
      expect(fit.speciesSpectra.map((s) => s.species)).toEqual(['B', label === '1:1' ? 'AB' : 'AB₂']);
      expect(relativeToPeak(fit.speciesSpectra[1].epsilon, eps.complex)).toBeLessThan(1e-6);
      expect(fit.p).toBe(1 + 2 * 301);
    },
  );

  it('holds a known reactant spectrum: fewer parameters, the same K', () => {
    const y = synthesise(mixtures, wl, '1:2', 2e6);
    const fit = fitSpectralModel(mixtures, y, parseStoichiometry('1:2'), { reactantA: { epsilon: eps.a } });
    expect(Math.abs((fit.k as number) - 2e6) / 2e6).toBeLessThan(1e-6);
    expect(fit.speciesSpectra[0]).toMatchObject({ species: 'A', source: 'held' });
    expect(fit.speciesSpectra[0].se.every((v) => v === null)).toBe(true);
    expect(fit.p).toBe(1 + 2 * 301);
    expect(relativeToPeak(fit.speciesSpectra[2].epsilon, eps.complex)).toBeLessThan(1e-6);
  });

  it.each([
    ['1:1', 800, 0.5],
    ['1:2', 2e6, 0.6667],
  ] as const)(
    '%s: the fitted complex peaks at x_B = b/(a + b) over a Job’s series (reference other_facts.json)',
    (label, k, xMax) => {
      // Source: /work/shared/reference/other_facts.json "jobs_method_max_mole_fraction" (mathematical fact).
      const facts = readJson<{ jobs_method_max_mole_fraction: { cases: Record<string, number> } }>(
        'other_facts.json',
      );
      expect(facts.jobs_method_max_mole_fraction.cases[label === '1:1' ? '1:1' : 'M:L 1:2']).toBeCloseTo(
        xMax,
        4,
      );
      const job = Array.from({ length: 11 }, (_, i) => ({
        a0M: 1e-3 * (1 - (i + 1) / 12),
        b0M: 1e-3 * ((i + 1) / 12),
        pathLengthCm: 1,
      }));
      const fit = fitSpectralModel(job, synthesise(job, wl, label, k), parseStoichiometry(label));
      const complex = fit.speciesConcentrations.find((s) => s.role === 'complex')?.concentrationM as number[];
      const best = complex.indexOf(Math.max(...complex));
      expect(job[best].b0M / (job[best].a0M + job[best].b0M)).toBeCloseTo(xMax, 1);
      expect(Math.round(xMax * 12)).toBe(best + 1);
    },
  );
});

describe('seeded noise (invented spectra, σ = 0.002)', () => {
  const wl = grid();
  const mixtures = design();

  it.each(Object.entries(TRUE))(
    'true %s ranks first and its 95 % interval covers the truth (3 seeds)',
    (label, k) => {
      for (const seed of [1, 2, 3]) {
        const y = synthesise(mixtures, wl, label, k, { noiseSd: 0.002, seed });
        const fits = CANDIDATES.map((c) => fitSpectralModel(mixtures, y, parseStoichiometry(c)));
        const ranking = rankStoichiometries(
          fits.map((f) => ({
            model: f.model,
            kStats: null,
            fit: { converged: f.converged, aic: f.aic, status: f.kStatus, message: f.message },
          })),
        );
        expect(ranking.best).toBe(label);
        expect(ranking.ambiguous).toBe(false);
        const truth = fits.find((f) => f.model === label);
        const [lo, hi] = truth?.kCi95 as [number, number];
        expect(lo).toBeLessThan(k);
        expect(hi).toBeGreaterThan(k);
        expect(truth?.residualSd as number).toBeCloseTo(0.002, 3);
      }
    },
  );

  it('the 95 % interval covers the true K in at least 17 of 20 seeds (binomial: expected 19)', () => {
    const coarse = grid(350, 650, 10);
    let covered = 0;
    for (let seed = 1; seed <= 20; seed++) {
      const y = synthesise(mixtures, coarse, '1:1', 800, { noiseSd: 0.002, seed });
      const [lo, hi] = fitSpectralModel(mixtures, y, parseStoichiometry('1:1')).kCi95 as [number, number];
      if (lo < 800 && hi > 800) covered++;
    }
    expect(covered).toBeGreaterThanOrEqual(17);
  });

  it('the standard errors of ε match the scatter over 30 seeds (within 25 %)', () => {
    const coarse = grid(350, 650, 10);
    const peak = coarse.indexOf(470);
    const values: number[] = [];
    const ses: number[] = [];
    for (let seed = 1; seed <= 30; seed++) {
      const y = synthesise(mixtures, coarse, '1:1', 800, { noiseSd: 0.002, seed: 100 + seed });
      const complex = fitSpectralModel(mixtures, y, parseStoichiometry('1:1')).speciesSpectra[2];
      values.push(complex.epsilon[peak]);
      ses.push(complex.se[peak] as number);
    }
    const mean = values.reduce((s, v) => s + v, 0) / values.length;
    const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1));
    const meanSe = ses.reduce((s, v) => s + v, 0) / ses.length;
    expect(sd / meanSe).toBeGreaterThan(0.75);
    expect(sd / meanSe).toBeLessThan(1.25);
  });

  it('non-negative spectra: no ε below zero, a larger RSS, K still covered', () => {
    const y = synthesise(mixtures, grid(350, 650, 5), '1:1', 800, { noiseSd: 0.002, seed: 5 });
    const free = fitSpectralModel(mixtures, y, parseStoichiometry('1:1'));
    const nn = fitSpectralModel(mixtures, y, parseStoichiometry('1:1'), { nonNegativeSpectra: true });
    expect(free.speciesSpectra.some((s) => s.epsilon.some((e) => e < 0))).toBe(true);
    expect(nn.speciesSpectra.every((s) => s.epsilon.every((e) => e >= 0))).toBe(true);
    expect(nn.rss as number).toBeGreaterThanOrEqual((free.rss as number) * (1 - 1e-12));
    const [lo, hi] = nn.kCi95 as [number, number];
    expect(lo).toBeLessThan(800);
    expect(hi).toBeGreaterThan(800);
    // An ε held at zero by its bound has no standard error.
    nn.speciesSpectra.forEach((s) => s.epsilon.forEach((e, j) => e === 0 && expect(s.se[j]).toBeNull()));
  });
});

describe('a one-wavelength slice agrees with the single-wavelength global fit', () => {
  const wl = grid();
  const mixtures = design();
  it.each(Object.entries(TRUE))(
    '%s at 530 nm (seeded noise): K and ε to 1e-6, the same RSS, AIC and interval',
    (label, k) => {
      const y = synthesise(mixtures, wl, label, k, { noiseSd: 0.002, seed: 9 });
      const j = wl.indexOf(530);
      const model = parseStoichiometry(label);
      const spectral = fitSpectralModel(
        mixtures,
        y.map((row) => [row[j]]),
        model,
        { reactantA: 'none', reactantB: 'none' },
      );
      const single = fitEquilibriumModel(
        mixtures.map((mx, i) => ({ ...mx, absorbance: y[i][j] })),
        model,
      );
      expect(spectral.kStatus).toBe(single.status);
      expect(Math.abs((spectral.k as number) - (single.k as number)) / (single.k as number)).toBeLessThan(
        1e-6,
      );
      const e = spectral.speciesSpectra[0].epsilon[0];
      expect(Math.abs(e - (single.epsilonLPerMolCm as number)) / e).toBeLessThan(1e-6);
      expect(spectral.p).toBe(single.p);
      expect(
        Math.abs((spectral.rss as number) - (single.rss as number)) / (single.rss as number),
      ).toBeLessThan(1e-9);
      expect(spectral.aic as number).toBeCloseTo(single.aic as number, 6);
      const [slo, shi] = spectral.kCi95 as [number, number];
      const [glo, ghi] = single.kCi95 as [number, number];
      expect(Math.abs(slo - glo) / glo).toBeLessThan(1e-4);
      expect(Math.abs(shi - ghi) / ghi).toBeLessThan(1e-4);
      // The linearised SEs agree too (both from the Jacobian of the same model at the same optimum).
      expect(
        Math.abs((spectral.kSe as number) - (single.kSe as number)) / (single.kSe as number),
      ).toBeLessThan(1e-3);
    },
  );
});

describe('iteration limits', () => {
  it('a non-negative solver out of iterations makes the fit "not-converged", never a silent answer', () => {
    const mixtures = design();
    const y = synthesise(mixtures, grid(350, 650, 10), '1:1', 800, { noiseSd: 0.002, seed: 5 });
    const fit = fitSpectralModel(mixtures, y, parseStoichiometry('1:1'), {
      nonNegativeSpectra: true,
      nnlsMaxIterations: 1,
    });
    expect(fit.kStatus).toBe('not-converged');
    expect(fit.converged).toBe(false);
    expect(fit.k).toBeNull();
    expect(fit.message).toMatch(/ran out of iterations/);
  });

  it('an optimiser held to one iteration says it did not converge', () => {
    const mixtures = design();
    const y = synthesise(mixtures, grid(350, 650, 10), '1:2', 2e6, { noiseSd: 0.002, seed: 5 });
    const fit = fitSpectralModel(mixtures, y, parseStoichiometry('1:2'), { maxIterations: 1 });
    expect(fit.kStatus).toBe('not-converged');
    expect(fit.message).toMatch(/maximum of 1 iterations/);
  });
});

describe('what the data do not say', () => {
  const wl = grid(350, 650, 10);
  it('complete binding gives a lower bound on K, not a number', () => {
    const mixtures = design();
    const y = synthesise(mixtures, wl, '1:1', 1e10, { noiseSd: 0.002, seed: 2 });
    const fit = fitSpectralModel(mixtures, y, parseStoichiometry('1:1'));
    expect(fit.kStatus).toBe('lower-bound');
    expect(fit.k).toBeNull();
    expect(fit.kLowerBound95 as number).toBeGreaterThan(1e4);
    expect(fit.warnings.join(' ')).toMatch(/too large to determine/);
  });

  it('says when the species’ spectra cannot be separated (A₀ = B₀ in every mixture)', () => {
    const mixtures = [1, 2, 3, 4, 5, 6].map((i) => ({ a0M: i * 2e-4, b0M: i * 2e-4, pathLengthCm: 1 }));
    const y = synthesise(mixtures, wl, '1:1', 800);
    const fit = fitSpectralModel(mixtures, y, parseStoichiometry('1:1'));
    expect(fit.rank).toBe(2);
    expect(fit.warnings.join(' ')).toMatch(/not separately determined/);
    expect(fit.speciesSpectra.every((s) => s.se.every((v) => v === null))).toBe(true);
  });

  it('too few mixtures for the species: no fit, a reason', () => {
    const mixtures = design(2, 1);
    const fit = fitSpectralModel(mixtures, synthesise(mixtures, wl, '1:1', 800), parseStoichiometry('1:1'));
    expect(fit.kStatus).toBe('not-determined');
    expect(fit.message).toMatch(/needs more than 3 mixtures/);
  });

  it('refuses a ragged matrix, a gap, impossible concentrations and a held spectrum of the wrong length', () => {
    const model = parseStoichiometry('1:1');
    const mx = design(3, 2);
    const y = synthesise(mx, wl, '1:1', 800);
    expect(() => fitSpectralModel(mx, y.slice(1), model)).toThrow(/one row per mixture/);
    expect(() =>
      fitSpectralModel(
        mx,
        y.map((r, i) => (i === 0 ? r.slice(1) : r)),
        model,
      ),
    ).toThrow(/every wavelength/);
    expect(() =>
      fitSpectralModel(
        mx,
        y.map((r) => r.map(() => NaN)),
        model,
      ),
    ).toThrow(/finite/);
    expect(() =>
      fitSpectralModel(
        mx.map((m) => ({ ...m, a0M: -1 })),
        y,
        model,
      ),
    ).toThrow(/A₀, B₀/);
    expect(() => fitSpectralModel(mx, y, model, { reactantA: { epsilon: [1, 2] } })).toThrow(
      /held spectrum of A/,
    );
  });
});

describe('the example in the doc comment', () => {
  it('recovers K = 500 from two wavelengths', () => {
    const m = parseStoichiometry('1:1');
    const mixtures = [1, 2, 4, 8, 16].map((r) => ({ a0M: 1e-4, b0M: r * 1e-4, pathLengthCm: 1 }));
    const y = mixtures.map((x) => {
      const s = solveEquilibrium(500, x.a0M, x.b0M, m);
      return [2000 * s.productM + 100 * s.bFreeM, 5000 * s.productM];
    });
    expect(fitSpectralModel(mixtures, y, m, { reactantA: 'none' }).k as number).toBeCloseTo(500, 6);
  });
});
