/**
 * Writes the invented demo files of samples/analysis/: a cuvette run of a 1:1 metal–ligand complex,
 * generated from a chosen K and ε with small seeded noise. Run: npx tsx scripts/make-analysis-samples.ts
 */
import { writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { parseStoichiometry, seededRandom, solveEquilibrium } from '../server/src/analysis';

const OUT = resolve(__dirname, '../samples/analysis');
const TRUE_K_PER_M = 850;
const TRUE_EPSILON = 1250;
const WAVELENGTH_NM = 640;
const BACKGROUND_ABSORBANCE = 0.038;
const NOISE_SD = 0.002;
const rng = seededRandom(20240611);
const model = parseStoichiometry('1:1');

interface Row {
  position: string;
  sampleId: string;
  role: string;
  concentrationM?: number;
  dilutionFactor?: number;
  stockAM?: number;
  volumeAMl?: number;
  stockBM?: number;
  volumeBMl?: number;
  totalVolumeMl?: number;
  replicateGroup?: string;
  /** Complex concentration in the cuvette, mol/L. */
  complexM: number;
}

const rows: Row[] = [];
let next = 1;
const pos = (): string => `C${next++}`;

rows.push({ position: pos(), sampleId: 'BLK-1', role: 'blank', replicateGroup: 'BLK', complexM: 0 });
rows.push({ position: pos(), sampleId: 'BLK-1', role: 'blank', replicateGroup: 'BLK', complexM: 0 });
for (const c of [1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4, 7e-4]) {
  rows.push({
    position: pos(),
    sampleId: `STD-${(c * 1e6).toFixed(0)}uM`,
    role: 'standard',
    concentrationM: c,
    complexM: c,
  });
}
for (const [id, cInCuvette, dilution] of [
  ['SMP-017', 2.4e-4, 1],
  ['SMP-018', 1.1e-4, 5],
  ['SMP-019', 4.6e-4, 10],
] as const) {
  for (let r = 0; r < 2; r++) {
    rows.push({
      position: pos(),
      sampleId: id,
      role: 'unknown',
      dilutionFactor: dilution,
      replicateGroup: id,
      complexM: cInCuvette,
    });
  }
}
// Job's series: stocks 5.00 mM, 4.00 mL of reactants made up to 10.00 mL (A₀ + B₀ = 2.00 mM).
const stockM = 5e-3;
for (let i = 1; i <= 9; i++) {
  const volumeBMl = 0.4 * i;
  const volumeAMl = 4 - volumeBMl;
  const a0 = (stockM * volumeAMl) / 10;
  const b0 = (stockM * volumeBMl) / 10;
  rows.push({
    position: pos(),
    sampleId: `JOB-${i}`,
    role: 'mixture',
    stockAM: stockM,
    volumeAMl: Number(volumeAMl.toFixed(2)),
    stockBM: stockM,
    volumeBMl: Number(volumeBMl.toFixed(2)),
    totalVolumeMl: 10,
    complexM: solveEquilibrium(TRUE_K_PER_M, a0, b0, model).productM,
  });
}
// Ligand-excess series: 0.40 mL of 5.00 mM metal, 50.0 mM ligand, to 10.00 mL.
for (const [i, volumeBMl] of [0.4, 0.6, 0.8, 1.2, 1.6, 2.0].entries()) {
  const a0 = (stockM * 0.4) / 10;
  const b0 = (5e-2 * volumeBMl) / 10;
  rows.push({
    position: pos(),
    sampleId: `XS-${i + 1}`,
    role: 'mixture',
    stockAM: stockM,
    volumeAMl: 0.4,
    stockBM: 5e-2,
    volumeBMl,
    totalVolumeMl: 10,
    complexM: solveEquilibrium(TRUE_K_PER_M, a0, b0, model).productM,
  });
}

const num = (v: number | undefined, digits = 6): string =>
  v === undefined ? '' : Number(v.toPrecision(digits)).toString();
const manifest = [
  'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group',
  ...rows.map((r) =>
    [
      r.position,
      r.sampleId,
      r.role,
      num(r.concentrationM),
      num(r.dilutionFactor),
      num(r.stockAM),
      num(r.volumeAMl),
      num(r.stockBM),
      num(r.volumeBMl),
      num(r.totalVolumeMl),
      r.replicateGroup ?? '',
    ].join(','),
  ),
];
const readings = [
  'position,wavelength_nm,absorbance,read_time,temperature_c',
  ...rows.map((r, i) => {
    const a = BACKGROUND_ABSORBANCE + TRUE_EPSILON * 1 * r.complexM + NOISE_SD * rng.normal();
    const time = new Date(Date.UTC(2024, 5, 11, 9, 30, 0) + i * 45_000).toISOString().replace('.000Z', 'Z');
    return `${r.position},${WAVELENGTH_NM},${a.toFixed(4)},${time},25.0`;
  }),
];
writeFileSync(resolve(OUT, 'manifest.csv'), manifest.join('\n') + '\n');
writeFileSync(resolve(OUT, 'readings.csv'), readings.join('\n') + '\n');
console.log(`wrote ${rows.length} positions to ${OUT}`);
