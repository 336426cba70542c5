import { AnalysisError } from '../errors';
import { solveEquilibrium } from '../equilibrium-solve';
import { seededRandom } from '../random';
import { analyzeSpectra } from '../spectral-analysis';
import { parseStoichiometry } from '../stoichiometry-model';
import { Reading, SampleDefinition } from '../types';
import { grid, relativeToPeak, spectra } from './spectral-synthetic';

/** An invented plate: two blanks and mixtures in replicate pairs, read from 350 to 650 nm every 5 nm. */
interface PlateOptions {
  label?: string;
  k?: number;
  noiseSd?: number;
  /** Add mixtures of A only and of B only (the ends of the Job's series). */
  pureEnds?: boolean;
  /** Position read in a 0.5 cm path. */
  halfPathPosition?: string;
  /** Noise on the blanks too (default true). */
  blankNoise?: boolean;
}

const STOCK_M = 5e-3;

function plate(options: PlateOptions = {}): {
  readings: Reading[];
  samples: SampleDefinition[];
  wl: number[];
} {
  const wl = grid(350, 650, 5);
  const eps = spectra(wl);
  const model = parseStoichiometry(options.label ?? '1:1');
  const k = options.k ?? 800;
  const rng = seededRandom(11);
  const noise = (): number => (options.noiseSd ?? 0) * rng.normal();
  const baseline = wl.map((nm) => 0.04 + (0.02 * (nm - 350)) / 300);
  const readings: Reading[] = [];
  const samples: SampleDefinition[] = [];
  let index = 0;
  const nextPosition = (): string =>
    `${String.fromCharCode(65 + Math.floor(index / 12))}${(index++ % 12) + 1}`;
  for (let i = 0; i < 2; i++) {
    const position = nextPosition();
    samples.push({ position, sampleId: 'BLK', role: 'blank', replicateGroup: 'BLK' });
    wl.forEach((wavelengthNm, j) =>
      readings.push({
        position,
        wavelengthNm,
        absorbance: baseline[j] + (options.blankNoise === false ? 0 : noise()),
      }),
    );
  }
  const recipes: { volumeAMl: number; volumeBMl: number; stockBM: number }[] = [];
  if (options.pureEnds) recipes.push({ volumeAMl: 2, volumeBMl: 0, stockBM: STOCK_M });
  for (let i = 0; i < 12; i++) {
    const x = (i + 0.5) / 12;
    recipes.push({ volumeAMl: 2 * (1 - x), volumeBMl: 2 * x, stockBM: STOCK_M });
  }
  if (options.pureEnds) recipes.push({ volumeAMl: 0, volumeBMl: 2, stockBM: STOCK_M });
  for (let i = 0; i < 10; i++) recipes.push({ volumeAMl: 0.4, volumeBMl: 0.1 * 1.4 ** i, stockBM: 2.5e-2 });
  recipes.forEach((r, g) => {
    const a0M = (STOCK_M * r.volumeAMl) / 10;
    const b0M = (r.stockBM * r.volumeBMl) / 10;
    const s = solveEquilibrium(k, a0M, b0M, model);
    for (let rep = 0; rep < 2; rep++) {
      const position = nextPosition();
      const path = position === options.halfPathPosition ? 0.5 : 1;
      samples.push({
        position,
        sampleId: `MIX-${g + 1}`,
        role: 'mixture',
        stockAM: STOCK_M,
        volumeAMl: r.volumeAMl,
        stockBM: r.stockBM,
        volumeBMl: r.volumeBMl,
        totalVolumeMl: 10,
        replicateGroup: `MIX-${g + 1}`,
      });
      wl.forEach((wavelengthNm, j) =>
        readings.push({
          position,
          wavelengthNm,
          absorbance:
            baseline[j] +
            path * (eps.a[j] * s.aFreeM + eps.b[j] * s.bFreeM + eps.complex[j] * s.productM) +
            noise(),
        }),
      );
    }
  });
  return { readings, samples, wl };
}

describe('analyzeSpectra on an invented plate', () => {
  it('noise-free: three species, 1:1 best, K to 1e-6, spectra back, plain JSON', () => {
    const { readings, samples, wl } = plate({ halfPathPosition: 'A4' });
    const r = analyzeSpectra(readings, samples, {
      pathLengthByPositionCm: { A4: 0.5 },
      candidates: ['1:1', '1:2', '2:1'],
    });
    expect(r.wavelengthsNm).toEqual(wl);
    expect(r.mixtures).toHaveLength(22);
    expect(r.mixtures[0]).toMatchObject({ sampleId: 'MIX-1', positions: ['A3', 'A4'] });
    expect(r.blankAbsorbance[0]).toBeCloseTo(0.04, 12);
    expect(r.speciesCount).toBe(3);
    expect(r.singularValues).toHaveLength(22);
    expect(r.noiseLevel).toBeLessThan(r.singularValues[2]);
    expect(r.best).toBe('1:1');
    expect(r.candidates.map((c) => c.model)).toEqual(['1:1', '1:2', '2:1']);
    const best = r.candidates[0];
    expect(Math.abs((best.k as number) - 800) / 800).toBeLessThan(1e-6);
    expect(best.kStatus).toBe('determined');
    expect(best.kUnit).toBe('L·mol⁻¹');
    const eps = spectra(wl);
    expect(relativeToPeak(best.speciesSpectra[2].epsilon, eps.complex)).toBeLessThan(1e-6);
    expect(best.residuals).toHaveLength(22);
    expect(best.residuals[0]).toHaveLength(wl.length);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
    expect(r.warnings).toEqual([]);
  });

  it('seeded noise: the true 1:2 ranks first, its interval covers K, the noise SD as given', () => {
    const { readings, samples } = plate({ label: '1:2', k: 2e6, noiseSd: 0.002, blankNoise: false });
    const r = analyzeSpectra(readings, samples, { absorbanceSd: 0.002 });
    expect(r.noiseSource).toBe('given');
    expect(r.speciesCount).toBe(3);
    expect(r.best).toBe('1:2');
    const fit = r.candidates.find((c) => c.model === '1:2');
    const [lo, hi] = fit?.kCi95 as [number, number];
    expect(lo).toBeLessThan(2e6);
    expect(hi).toBeGreaterThan(2e6);
    expect(r.ranking.verdict).toMatch(/^1:2 fits best/);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
  });

  it('noisy blanks: the error of the mean blank is shared by every mixture; a fitted baseline takes it up', () => {
    // The mean of two blanks, subtracted from every mixture, is one offset spectrum common to all rows: the
    // fit that assumes independent errors sees it as signal. With a baseline the offset is a parameter.
    const { readings, samples, wl } = plate({ label: '1:2', k: 2e6, noiseSd: 0.002 });
    const r = analyzeSpectra(readings, samples, { fitBaseline: true, candidates: ['1:1', '1:2'] });
    expect(r.best).toBe('1:2');
    const fit = r.candidates[1];
    const [lo, hi] = fit.kCi95 as [number, number];
    expect(lo).toBeLessThan(2e6);
    expect(hi).toBeGreaterThan(2e6);
    expect(fit.p).toBe(1 + 4 * wl.length);
    expect(fit.baseline?.absorbance).toHaveLength(wl.length);
    expect(Math.max(...(fit.baseline?.absorbance as number[]).map(Math.abs))).toBeLessThan(0.01);
    expect(() => analyzeSpectra(readings, samples, { fitBaseline: true, nonNegativeSpectra: true })).toThrow(
      /not with non-negative spectra/,
    );
  });

  it('limits the wavelengths to fromNm…toNm', () => {
    const { readings, samples } = plate();
    const r = analyzeSpectra(readings, samples, { fromNm: 400, toNm: 600, candidates: ['1:1'] });
    expect(r.wavelengthsNm[0]).toBe(400);
    expect(r.wavelengthsNm[r.wavelengthsNm.length - 1]).toBe(600);
    expect(r.absorbance[0]).toHaveLength(41);
  });

  it('holds the reactants’ spectra from the mixtures of A only and of B only', () => {
    const { readings, samples, wl } = plate({ pureEnds: true });
    const r = analyzeSpectra(readings, samples, {
      reactantA: 'from-pure-mixtures',
      reactantB: 'from-pure-mixtures',
      candidates: ['1:1'],
    });
    const fit = r.candidates[0];
    const eps = spectra(wl);
    expect(fit.speciesSpectra.map((s) => [s.species, s.source])).toEqual([
      ['A', 'held'],
      ['B', 'held'],
      ['AB', 'fitted'],
    ]);
    expect(relativeToPeak(fit.speciesSpectra[0].epsilon, eps.a)).toBeLessThan(1e-9);
    expect(relativeToPeak(fit.speciesSpectra[1].epsilon, eps.b)).toBeLessThan(1e-9);
    expect(Math.abs((fit.k as number) - 800) / 800).toBeLessThan(1e-6);
    expect(fit.p).toBe(1 + wl.length);
  });

  it('skips a saturated reading, then leaves out a wavelength no replicate of a mixture has', () => {
    const { readings, samples, wl } = plate();
    const saturate = (position: string, nm: number): void => {
      const reading = readings.find((x) => x.position === position && x.wavelengthNm === nm) as Reading;
      reading.absorbance = null;
      reading.flag = 'saturated';
    };
    saturate('A3', 470);
    const one = analyzeSpectra(readings, samples, { candidates: ['1:1'] });
    expect(one.wavelengthsNm).toHaveLength(wl.length);
    saturate('A4', 470);
    const both = analyzeSpectra(readings, samples, { candidates: ['1:1'] });
    expect(both.wavelengthsNm).not.toContain(470);
    expect(both.wavelengthsNm).toHaveLength(wl.length - 1);
    expect(both.warnings.join(' ')).toMatch(/no usable reading \(saturated or missing\) at 470 nm/);
    expect(Math.abs((both.candidates[0].k as number) - 800) / 800).toBeLessThan(1e-6);
  });

  it('leaves out a mixture read at too few wavelengths, and excluded positions', () => {
    const { readings, samples } = plate();
    const sparse = readings.filter(
      (x) => !(x.position === 'A5' || x.position === 'A6') || x.wavelengthNm < 400,
    );
    const r = analyzeSpectra(sparse, samples, { candidates: ['1:1'] });
    expect(r.mixtures.map((m) => m.sampleId)).not.toContain('MIX-2');
    expect(r.warnings.join(' ')).toMatch(/mixture MIX-2: usable readings at only 10 of 61 wavelengths/);
    const excluded = analyzeSpectra(readings, samples, {
      candidates: ['1:1'],
      exclusions: [{ position: 'A3', reason: 'bubble' }],
    });
    expect(excluded.mixtures[0].positions).toEqual(['A4']);
  });

  it('warns about readings without a manifest row and a batch without blanks', () => {
    const { readings, samples } = plate();
    const r = analyzeSpectra(
      [...readings, { position: 'H12', wavelengthNm: 400, absorbance: 0.1 }],
      samples.filter((s) => s.role !== 'blank'),
      { candidates: ['1:1'] },
    );
    expect(r.warnings.join(' ')).toMatch(/H12 have no manifest row/);
    expect(r.warnings.join(' ')).toMatch(/no usable blank/);
    // Without the blank the baseline stays in: a fourth "species" appears.
    expect(r.speciesCount).toBeGreaterThanOrEqual(4);
    expect(r.warnings.join(' ')).toMatch(/fits hold only 3/);
  });

  it('refuses bad settings and a batch without spectra, with clear errors', () => {
    const { readings, samples } = plate();
    expect(() => analyzeSpectra(readings, samples, { fromNm: 600, toNm: 400 })).toThrow(
      /starts after it ends/,
    );
    expect(() => analyzeSpectra(readings, samples, { absorbanceSd: -1 })).toThrow(AnalysisError);
    expect(() => analyzeSpectra(readings, samples, { reactantA: 'from-pure-mixtures' })).toThrow(
      /needs a mixture with A only/,
    );
    expect(() => analyzeSpectra(readings, samples, { reactantA: 'sometimes' as unknown as 'none' })).toThrow(
      /reactant A/,
    );
    expect(() => analyzeSpectra(readings, samples, { candidates: ['1:x'] })).toThrow(/stoichiometry/);
    expect(() =>
      analyzeSpectra(
        readings.filter((x) => ['A1', 'A2', 'A3'].includes(x.position)),
        samples,
      ),
    ).toThrow(/at least 2 mixtures/);
    expect(() => analyzeSpectra(readings, samples, { fromNm: 900 })).toThrow(
      /at least 2 mixtures|no wavelength/,
    );
  });
});
