// Test helper: invented spectra of an invented A + B system (Gaussian bands), for the whole-spectrum tests.
import { solveEquilibrium } from '../equilibrium-solve';
import { seededRandom } from '../random';
import { SpectralMixture } from '../spectral-fit';
import { parseStoichiometry } from '../stoichiometry-model';

const band = (centreNm: number, height: number, widthNm: number) => (nm: number) =>
  height * Math.exp(-((nm - centreNm) ** 2) / (2 * widthNm * widthNm));

/** Wavelengths from `fromNm` to `toNm` in `stepNm` steps. */
export function grid(fromNm = 350, toNm = 650, stepNm = 1): number[] {
  const out: number[] = [];
  for (let nm = fromNm; nm <= toNm + 1e-9; nm += stepNm) out.push(Math.round(nm * 1000) / 1000);
  return out;
}

/** Invented spectra, L·mol⁻¹·cm⁻¹: A one band, B one band, the complex two overlapping bands. */
export function spectra(wavelengthsNm: readonly number[]): { a: number[]; b: number[]; complex: number[] } {
  return {
    a: wavelengthsNm.map(band(420, 800, 30)),
    b: wavelengthsNm.map(band(380, 1500, 25)),
    complex: wavelengthsNm.map((nm) => band(470, 4000, 35)(nm) + band(530, 2500, 30)(nm)),
  };
}

/** Invented design: a Job's series at 1 mM total and a B-excess series at 0.2 mM of A. */
export function design(jobPoints = 20, excessPoints = 20): SpectralMixture[] {
  const out: SpectralMixture[] = [];
  for (let i = 0; i < jobPoints; i++) {
    const x = (i + 0.5) / jobPoints;
    out.push({ a0M: 1e-3 * (1 - x), b0M: 1e-3 * x, pathLengthCm: 1 });
  }
  for (let i = 0; i < excessPoints; i++) out.push({ a0M: 2e-4, b0M: 5e-5 * 1.25 ** i, pathLengthCm: 1 });
  return out;
}

export interface SyntheticOptions {
  /** Whether free A absorbs (default true). */
  aAbsorbs?: boolean;
  noiseSd?: number;
  seed?: number;
}

/** Absorbance matrix (mixtures × wavelengths) by Beer–Lambert for the true model, with optional seeded noise. */
export function synthesise(
  mixtures: readonly SpectralMixture[],
  wavelengthsNm: readonly number[],
  label: string,
  k: number,
  options: SyntheticOptions = {},
): number[][] {
  const model = parseStoichiometry(label);
  const eps = spectra(wavelengthsNm);
  const rng = seededRandom(options.seed ?? 1);
  const aAbsorbs = options.aAbsorbs ?? true;
  const sd = options.noiseSd ?? 0;
  return mixtures.map((mx) => {
    const s = solveEquilibrium(k, mx.a0M, mx.b0M, model);
    return wavelengthsNm.map(
      (_, j) =>
        mx.pathLengthCm *
          ((aAbsorbs ? eps.a[j] * s.aFreeM : 0) + eps.b[j] * s.bFreeM + eps.complex[j] * s.productM) +
        sd * rng.normal(),
    );
  });
}

/** max |x − truth| / max |truth|: the error relative to the band's height. */
export function relativeToPeak(x: readonly number[], truth: readonly number[]): number {
  const peak = Math.max(...truth.map(Math.abs));
  return Math.max(...x.map((v, j) => Math.abs(v - truth[j]))) / peak;
}
