/**
 * Writes the invented demo scenario of samples/demo/ (used by the first-start demo seed and the demo
 * instrument). Run: npx tsx --tsconfig server/tsconfig.json scripts/make-demo-samples.ts
 *
 * 1. A municipal water laboratory (invented) measures iron as its coloured 1,10-phenanthroline complex
 *    at 510 nm on a 96-well reader: blanks, standards in duplicate, a check standard, 24 tap-water
 *    samples in triplicate.
 * 2. A research group (invented) measures the formation constant of a 1:1 metal–ligand complex in 1 cm
 *    cuvettes at 640 nm at 15, 25 and 35 °C.
 * All numbers are made up from chosen "true" values with small seeded noise; they are not measurements.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { parse } from 'csv-parse/sync';
import {
  GAS_CONSTANT_J_PER_MOL_K,
  mixtureInitialConcentrations,
  parseStoichiometry,
  pathLengthFromFillVolume,
  seededRandom,
  solveEquilibrium,
} from '../server/src/analysis';

const ROOT = resolve(__dirname, '../samples/demo');
const MANIFEST_HEADER =
  'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group';
const num = (v: number | undefined, digits = 6): string =>
  v === undefined ? '' : Number(v.toPrecision(digits)).toString();
const write = (path: string, text: string): void => {
  mkdirSync(resolve(ROOT, path, '..'), { recursive: true });
  writeFileSync(resolve(ROOT, path), text);
};

// ---- 1. Iron in tap water, 96-well plate grid at 510 nm -------------------------------------------
{
  const rng = seededRandom(510);
  const EPSILON = 11_000; // L/(mol·cm), chosen for the invented data
  const IRON_MG_PER_MOL = 55_845;
  const pathCm = pathLengthFromFillVolume(200, 6.4);
  const BACKGROUND = 0.045;
  const rows: string[] = [MANIFEST_HEADER];
  const iron = new Map<string, number>(); // position → iron in the well, mol/L
  const add = (
    position: string,
    sampleId: string,
    role: string,
    fields: Partial<Record<'c' | 'df' | 'group', string>>,
    ironM: number,
  ) => {
    rows.push(
      [
        position,
        sampleId,
        role,
        fields.c ?? '',
        fields.df ?? '',
        '',
        '',
        '',
        '',
        '',
        fields.group ?? '',
      ].join(','),
    );
    iron.set(position, ironM);
  };
  for (const r of ['A', 'B'])
    for (const c of [1, 2, 3]) add(`${r}${c}`, 'REAGENT-BLANK', 'blank', { group: 'BLK' }, 0);
  const standardsMgL = [0.5, 1, 2, 3, 4, 5];
  for (const r of ['A', 'B']) {
    standardsMgL.forEach((mgL, i) => {
      const m = mgL / IRON_MG_PER_MOL;
      add(`${r}${i + 4}`, `FE-STD-${mgL}`, 'standard', { c: num(m), group: `STD-${mgL}` }, m);
    });
  }
  for (const r of ['A', 'B'])
    for (const c of [10, 11, 12])
      add(
        `${r}${c}`,
        'CHECK-2.5',
        'control',
        { c: num(2.5 / IRON_MG_PER_MOL), group: 'CHECK' },
        2.5 / IRON_MG_PER_MOL,
      );
  let sample = 1;
  for (const r of ['C', 'D', 'E', 'F', 'G', 'H']) {
    for (const start of [1, 4, 7, 10]) {
      const id = `TAP-${String(sample).padStart(3, '0')}`;
      const dilution = sample % 5 === 0 ? 2 : 1;
      const mgL = 0.15 + 3.2 * rng.uniform();
      for (let k = 0; k < 3; k++)
        add(
          `${r}${start + k}`,
          id,
          'unknown',
          { df: String(dilution), group: id },
          mgL / dilution / IRON_MG_PER_MOL,
        );
      sample++;
    }
  }
  write('water/manifest.csv', `${rows.join('\n')}\n`);
  const grid = [
    'run_id,FE-101',
    'wavelength_nm,510',
    'temperature_c,22.0',
    'read_time,2026-11-30T08:15:00Z',
    ['', ...Array.from({ length: 12 }, (_, i) => i + 1)].join(','),
  ];
  for (const r of 'ABCDEFGH') {
    const cells = Array.from({ length: 12 }, (_, i) => {
      const m = iron.get(`${r}${i + 1}`) ?? 0;
      return (BACKGROUND + EPSILON * pathCm * m + 0.003 * rng.normal()).toFixed(4);
    });
    grid.push([r, ...cells].join(','));
  }
  write('exports/plate-reader-1/FE-101.csv', `${grid.join('\n')}\n`);
}

// ---- 2. A 1:1 metal–ligand complex at three temperatures, 30 cuvettes at 640 nm ---------------------
{
  // The cuvette design of samples/analysis (blanks, standards, unknowns, a Job's series, a ligand-excess series).
  const design = parse(readFileSync(resolve(__dirname, '../samples/analysis/manifest.csv')), {
    columns: true,
  }) as Record<string, string>[];
  write('complex/manifest.csv', readFileSync(resolve(__dirname, '../samples/analysis/manifest.csv'), 'utf8'));
  const model = parseStoichiometry('1:1');
  const EPSILON = 1250;
  const K25 = 850;
  const DELTA_H = -18_000; // J/mol, chosen for the invented data
  const kAt = (t: number) =>
    K25 * Math.exp((-DELTA_H / GAS_CONSTANT_J_PER_MOL_K) * (1 / (t + 273.15) - 1 / 298.15));
  const n = (v: string | undefined) => (v ? Number(v) : 0);
  /** Complex in the cuvette for each unknown sample (its replicates share it). */
  const UNKNOWN_COMPLEX_M: Record<string, number> = {
    'SMP-017': 2.4e-4,
    'SMP-018': 1.1e-4,
    'SMP-019': 4.6e-4,
  };
  for (const temperatureC of [15, 25, 35]) {
    const rng = seededRandom(1000 + temperatureC);
    const lines = design.map((row, i) => {
      let product = 0;
      if (row['role'] === 'standard') product = n(row['concentration_M']);
      if (row['role'] === 'unknown') product = UNKNOWN_COMPLEX_M[row['sample_id']] ?? 2e-4;
      if (row['role'] === 'mixture') {
        const { a0M, b0M } = mixtureInitialConcentrations({
          stockAM: n(row['stock_a_M']),
          volumeAMl: n(row['volume_a_mL']),
          stockBM: n(row['stock_b_M']),
          volumeBMl: n(row['volume_b_mL']),
          totalVolumeMl: n(row['total_volume_mL']),
        });
        product = solveEquilibrium(kAt(temperatureC), a0M, b0M, model).productM;
      }
      const a = 0.038 + EPSILON * product + 0.002 * rng.normal();
      const time = new Date(Date.UTC(2026, 10, 30, 10, 0, 0) + i * 40_000)
        .toISOString()
        .replace('.000Z', 'Z');
      return `${row['position']},640,${a.toFixed(4)},${time},${temperatureC.toFixed(1)}`;
    });
    const header = 'position,wavelength_nm,absorbance,read_time,temperature_c';
    if (temperatureC === 25) {
      // The live demo: the 25 °C run arrives in three exports, one after another.
      const parts = [lines.slice(0, 15), lines.slice(15, 22), lines.slice(22)];
      parts.forEach((part, i) =>
        write(`exports/cuvette-1/CX-25-part${i + 1}.csv`, `${[header, ...part].join('\n')}\n`),
      );
    } else {
      write(`complex/CX-${temperatureC}.csv`, `${[header, ...lines].join('\n')}\n`);
    }
  }
}
console.log(`wrote the demo scenario to ${ROOT}`);
