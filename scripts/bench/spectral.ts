/**
 * Benchmark of the whole-spectrum analysis: an invented batch of 40 mixtures (a Job's series and a B-excess
 * series), two blanks, 301 wavelengths (350–650 nm), 4 candidate stoichiometries; A, B and a 1:1 complex
 * absorb, with seeded noise. Prints medians over repeats (wall and CPU time of this process: the machine
 * is shared), a split (matrix, species count, fits), and the ratio to a floor measured in the same run: one
 * SVD (singular values only) of the same 40 × 301 matrix with ml-matrix.
 * Run: npm run bench:spectral
 */
import { SingularValueDecomposition } from 'ml-matrix';
import {
  analyzeSpectra,
  buildSpectralMatrix,
  estimateSpeciesCount,
  fitSpectralModel,
  parseStoichiometry,
  Reading,
  resolveSpectralSettings,
  SampleDefinition,
  seededRandom,
  solveEquilibrium,
  spectralRowBasis,
} from '../../server/src/analysis';

const K_TRUE = 800;
const CANDIDATES = ['1:1', '1:2', '2:1', '1:3'];
const band = (centreNm: number, height: number, widthNm: number) => (nm: number) =>
  height * Math.exp(-((nm - centreNm) ** 2) / (2 * widthNm * widthNm));
const wl = Array.from({ length: 301 }, (_, j) => 350 + j);
const epsA = wl.map(band(420, 800, 30));
const epsB = wl.map(band(380, 1500, 25));
const epsC = wl.map((nm) => band(470, 4000, 35)(nm) + band(530, 2500, 30)(nm));
const rng = seededRandom(2026);
const model = parseStoichiometry('1:1');
const readings: Reading[] = [];
const samples: SampleDefinition[] = [];
let index = 0;
const nextPosition = (): string => `${String.fromCharCode(65 + Math.floor(index / 12))}${(index++ % 12) + 1}`;
for (let i = 0; i < 2; i++) {
  const position = nextPosition();
  samples.push({ position, sampleId: 'BLK', role: 'blank', replicateGroup: 'BLK' });
  for (const nm of wl) readings.push({ position, wavelengthNm: nm, absorbance: 0.04 + 0.002 * rng.normal() });
}
for (let i = 0; i < 40; i++) {
  const job = i < 20;
  const x = (i + 0.5) / 20;
  const volumeAMl = job ? 2 * (1 - x) : 0.4;
  const volumeBMl = job ? 2 * x : 0.1 * 1.25 ** (i - 20);
  const stockBM = job ? 5e-3 : 2.5e-2;
  const position = nextPosition();
  samples.push({
    position,
    sampleId: `MIX-${i + 1}`,
    role: 'mixture',
    stockAM: 5e-3,
    volumeAMl,
    stockBM,
    volumeBMl,
    totalVolumeMl: 10,
  });
  const s = solveEquilibrium(K_TRUE, (5e-3 * volumeAMl) / 10, (stockBM * volumeBMl) / 10, model);
  wl.forEach((nm, j) =>
    readings.push({
      position,
      wavelengthNm: nm,
      absorbance:
        0.04 + epsA[j] * s.aFreeM + epsB[j] * s.bFreeM + epsC[j] * s.productM + 0.002 * rng.normal(),
    }),
  );
}

const settings = { candidates: CANDIDATES };
const resolved = resolveSpectralSettings(settings);
const matrix = buildSpectralMatrix(readings, samples, resolved);

const cpuMs = (): number => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
const median = (v: number[]): number => {
  const s = v.slice().sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
function measure(fn: () => void, repeats: number): { wall: number; cpu: number } {
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const w0 = performance.now();
    const c0 = cpuMs();
    fn();
    cpu.push(cpuMs() - c0);
    wall.push(performance.now() - w0);
  }
  return { wall: median(wall), cpu: median(cpu) };
}

// Warm up the JIT, then measure.
const svd = (): number[] =>
  new SingularValueDecomposition(matrix.absorbance, {
    autoTranspose: true,
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
  }).diagonal;
for (let i = 0; i < 10; i++) svd();
for (let i = 0; i < 3; i++) analyzeSpectra(readings, samples, settings);
const floor = measure(svd, 41);
const repeats = 21;
const total = measure(() => analyzeSpectra(readings, samples, settings), repeats);
const build = measure(() => buildSpectralMatrix(readings, samples, resolved), repeats);
const count = measure(() => estimateSpeciesCount(matrix.absorbance), repeats);
const basis = spectralRowBasis(matrix.absorbance);
const fits = measure(() => {
  for (const c of CANDIDATES)
    fitSpectralModel(matrix.mixtures, matrix.absorbance, parseStoichiometry(c), { rowBasis: basis });
}, repeats);
const nnlsRepeats = 3;
const nnls = measure(
  () => analyzeSpectra(readings, samples, { ...settings, nonNegativeSpectra: true }),
  nnlsRepeats,
);

const result = analyzeSpectra(readings, samples, settings);
const best = result.candidates.find((c) => c.model === result.best);
const ms = (v: number): string => `${v.toFixed(1)} ms`;
const both = (t: { wall: number; cpu: number }): string => `${ms(t.wall)} wall, ${ms(t.cpu)} CPU`;
console.log(
  `Batch: ${result.mixtures.length} mixtures × ${result.wavelengthsNm.length} wavelengths, candidates ${CANDIDATES.join(', ')}`,
);
console.log(
  `Species ${result.speciesCount}; best ${result.best}; K = ${best?.k?.toFixed(1)} L·mol⁻¹ ` +
    `(95 % CI ${best?.kCi95?.map((v) => v?.toFixed(1)).join(' to ')}; true ${K_TRUE})`,
);
for (const w of result.warnings) console.log(`  note: ${w}`);
console.log(`Floor: one SVD of the 40 × 301 matrix (ml-matrix, values only), median of 41: ${both(floor)}`);
console.log(
  `analyzeSpectra, median of ${repeats}: ${both(total)}  (${(total.wall / floor.wall).toFixed(1)}× floor wall, ` +
    `${(total.cpu / Math.max(floor.cpu, 1e-3)).toFixed(1)}× CPU; aim < 200 ms)`,
);
console.log(`  matrix from readings     ${both(build)}`);
console.log(`  species count (SVD)      ${both(count)}`);
console.log(`  4 candidate fits         ${both(fits)}`);
console.log(
  `Non-negative spectra (ml-fcnnls), median of ${nnlsRepeats}: ${both(nnls)}  (${(nnls.wall / floor.wall).toFixed(0)}× floor)`,
);
