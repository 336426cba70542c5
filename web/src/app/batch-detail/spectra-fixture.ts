// Test helper: an invented titration read as spectra (an invented system: A and its 1:1 complex absorb,
// B is transparent), for the Spectra section's tests. Not demo data.

// Plain shapes (assignable to the analysis module's Reading and SampleDefinition) so that the browser test,
// type-checked without the web app's path alias, can build its upload from the same plate.
interface Reading {
  position: string;
  wavelengthNm: number;
  absorbance: number;
}
interface SampleDefinition {
  position: string;
  sampleId: string;
  role: 'blank' | 'mixture';
  stockAM?: number;
  volumeAMl?: number;
  stockBM?: number;
  volumeBMl?: number;
  totalVolumeMl?: number;
}

/** The invented truth the tests recover. */
export const SPECTRA_K = 2500; // L/mol, 1:1
export const SPECTRA_WAVELENGTHS = Array.from({ length: 41 }, (_, j) => 400 + 5 * j);
const band = (centreNm: number, height: number, widthNm: number) => (nm: number) =>
  height * Math.exp(-((nm - centreNm) ** 2) / (2 * widthNm * widthNm));
export const EPSILON_A = SPECTRA_WAVELENGTHS.map(band(430, 900, 35));
export const EPSILON_AB = SPECTRA_WAVELENGTHS.map(band(510, 3200, 40));
const BLANK = 0.03;
const STOCK_A_M = 1e-3;
const STOCK_B_M = 1e-2;
const TOTAL_ML = 10;

/**
 * [AB] of a 1:1 complex from the quadratic of K = x / ((a − x)(b − x)): the closed form written here, apart
 * from the analysis module's solver (1:1 binding isotherm, e.g. Thordarson P., Chem. Soc. Rev. 2011, 40,
 * 1305, eq. 8 — from memory).
 */
export function complexOneToOne(k: number, a0: number, b0: number): number {
  const s = a0 + b0 + 1 / k;
  return (s - Math.sqrt(s * s - 4 * a0 * b0)) / 2;
}

/** Seeded normal deviates (a 32-bit LCG and Box–Muller), so the noise is the same in every run. */
function normals(seed: number): () => number {
  let state = seed >>> 0;
  const uniform = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return (state + 1) / 4294967297;
  };
  return () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
}

export interface SpectraPlate {
  readings: Reading[];
  samples: SampleDefinition[];
  /** Initial A and B of each mixture, mol/L, in the order of the manifest. */
  mixtures: { position: string; a0M: number; b0M: number }[];
}

/** Two blanks and 18 mixtures (a B-excess series at 0.2 mM A and a short Job's series), 1 cm, 400–600 nm. */
export function spectraPlate(noiseSd = 0.001): SpectraPlate {
  const noise = normals(7);
  const readings: Reading[] = [];
  const samples: SampleDefinition[] = [];
  const mixtures: SpectraPlate['mixtures'] = [];
  let index = 0;
  const next = () => `${String.fromCharCode(65 + Math.floor(index / 12))}${(index++ % 12) + 1}`;
  for (let i = 0; i < 2; i++) {
    const position = next();
    samples.push({ position, sampleId: 'BLK', role: 'blank' });
    for (const wavelengthNm of SPECTRA_WAVELENGTHS)
      readings.push({ position, wavelengthNm, absorbance: BLANK + noiseSd * noise() });
  }
  const recipes: { volumeAMl: number; volumeBMl: number }[] = [];
  for (let i = 0; i < 12; i++) recipes.push({ volumeAMl: 2, volumeBMl: 0.1 * 1.4 ** i });
  for (let i = 1; i <= 6; i++) recipes.push({ volumeAMl: (10 * (7 - i)) / 7, volumeBMl: (1 * i) / 7 });
  recipes.forEach((r, g) => {
    const position = next();
    const a0M = (STOCK_A_M * r.volumeAMl) / TOTAL_ML;
    const b0M = (STOCK_B_M * r.volumeBMl) / TOTAL_ML;
    const ab = complexOneToOne(SPECTRA_K, a0M, b0M);
    mixtures.push({ position, a0M, b0M });
    samples.push({
      position,
      sampleId: `T-${g + 1}`,
      role: 'mixture',
      stockAM: STOCK_A_M,
      volumeAMl: r.volumeAMl,
      stockBM: STOCK_B_M,
      volumeBMl: r.volumeBMl,
      totalVolumeMl: TOTAL_ML,
    });
    SPECTRA_WAVELENGTHS.forEach((wavelengthNm, j) =>
      readings.push({
        position,
        wavelengthNm,
        // Beer–Lambert with 1 cm: A = ε_A·[A] + ε_AB·[AB] (+ the blank's absorbance).
        absorbance: BLANK + EPSILON_A[j] * (a0M - ab) + EPSILON_AB[j] * ab + noiseSd * noise(),
      }),
    );
  });
  return { readings, samples, mixtures };
}
