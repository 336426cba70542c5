/**
 * Benchmark of the analysis core: one full batch on a 384-well plate (4 blanks, 8 standards,
 * 96 unknowns, 24 mixtures, 4 candidate stoichiometries with global fits), with and without a
 * 2,000-draw Monte Carlo. Prints medians over repeats, the per-step split, and the ratio to a floor
 * measured in the same run (a plain OLS fit over the same number of points).
 * Run: npm run bench:analysis
 */
import {
  analyzeBatch,
  BatchInstrumentation,
  fitLinear,
  parseStoichiometry,
  Reading,
  SampleDefinition,
  seededRandom,
  solveEquilibrium,
} from '../../server/src/analysis';

const K_TRUE = 850;
const EPSILON = 1250;
const rng = seededRandom(99);
const readings: Reading[] = [];
const samples: SampleDefinition[] = [];
let index = 0;
const nextPosition = (): string => {
  const row = String.fromCharCode(65 + Math.floor(index / 24));
  const col = (index % 24) + 1;
  index++;
  return `${row}${col}`;
};
const add = (sample: Omit<SampleDefinition, 'position'>, absorbance: number): void => {
  const position = nextPosition();
  samples.push({ position, ...sample });
  readings.push({ position, wavelengthNm: 640, absorbance: 0.04 + absorbance + 0.002 * rng.normal() });
};
for (let i = 0; i < 4; i++) add({ sampleId: 'BLK', role: 'blank', replicateGroup: 'BLK' }, 0);
for (let i = 1; i <= 8; i++)
  add({ sampleId: `STD-${i}`, role: 'standard', concentrationM: i * 9e-5 }, EPSILON * i * 9e-5);
for (let i = 0; i < 96; i++) {
  const c = 5e-5 + 6e-4 * rng.uniform();
  add(
    {
      sampleId: `U-${Math.floor(i / 2)}`,
      role: 'unknown',
      dilutionFactor: 2,
      replicateGroup: `U-${Math.floor(i / 2)}`,
    },
    EPSILON * c,
  );
}
const model = parseStoichiometry('1:1');
for (let i = 1; i <= 24; i++) {
  const job = i <= 12;
  const volumeBMl = job ? (4 * i) / 13 : 0.2 + 0.1 * (i - 12);
  const volumeAMl = job ? 4 - volumeBMl : 0.4;
  const stockBM = job ? 5e-3 : 5e-2;
  const a0 = (5e-3 * volumeAMl) / 10;
  const b0 = (stockBM * volumeBMl) / 10;
  add(
    {
      sampleId: `MIX-${i}`,
      role: 'mixture',
      stockAM: 5e-3,
      volumeAMl,
      stockBM,
      volumeBMl,
      totalVolumeMl: 10,
    },
    EPSILON * solveEquilibrium(K_TRUE, a0, b0, model).productM,
  );
}

const now = (): number => performance.now();
const median = (v: number[]): number => {
  const s = v.slice().sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
function time(fn: () => void, repeats: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = now();
    fn();
    out.push(now() - t0);
  }
  return out;
}

// Warm up the JIT, then measure.
for (let i = 0; i < 5; i++) analyzeBatch(readings, samples, { wavelengthNm: 640 });
const x = samples.map((_, i) => i * 1e-5);
const y = readings.map((r) => r.absorbance as number);
for (let i = 0; i < 1000; i++) fitLinear(x, y);
const floor = median(time(() => fitLinear(x, y), 2000));

const repeats = 41;
const steps: Record<string, number[]> = {};
const batchTimes = time(() => {
  const inst: BatchInstrumentation = { clock: now, timings: {} };
  analyzeBatch(readings, samples, { wavelengthNm: 640 }, inst);
  for (const [k, v] of Object.entries(inst.timings)) (steps[k] ??= []).push(v);
}, repeats);
const mcRepeats = 5;
let mcInterval: [number, number] | null = null;
const mcTimes = time(() => {
  const r = analyzeBatch(readings, samples, { wavelengthNm: 640, monteCarlo: { draws: 2000, seed: 7 } });
  mcInterval = r.uncertainty?.monteCarlo?.kCi95 ?? null;
}, mcRepeats);

const result = analyzeBatch(readings, samples, { wavelengthNm: 640 });
const ms = (v: number): string => `${v.toFixed(3)} ms`;
console.log(
  `Batch: ${samples.length} positions (4 blanks, 8 standards, 96 unknowns, 24 mixtures), candidates ${result.settings.candidates.join(', ')}`,
);
console.log(
  `Best ${result.stoichiometry?.best}; K = ${result.stoichiometry?.candidates[0].fit?.k?.toFixed(1)} (true ${K_TRUE})`,
);
console.log(`Floor (plain OLS over ${x.length} points), median of 2000: ${ms(floor)}`);
console.log(
  `Full batch without Monte Carlo, median of ${repeats}: ${ms(median(batchTimes))}  (${(median(batchTimes) / floor).toFixed(0)}× floor; aim < 20 ms)`,
);
for (const [k, v] of Object.entries(steps)) console.log(`  ${k.padEnd(24)} ${ms(median(v))}`);
console.log(
  `Full batch with Monte Carlo (2,000 draws), median of ${mcRepeats}: ${ms(median(mcTimes))}  (${(median(mcTimes) / floor).toFixed(0)}× floor); ` +
    `95 % interval of K ${mcInterval ? `[${(mcInterval as [number, number]).map((v) => v.toFixed(1)).join(', ')}]` : '—'}`,
);
