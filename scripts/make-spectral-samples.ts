/**
 * Writes the invented whole-spectrum demo files of samples/analysis/: a cuvette run of an invented 1:1
 * dye–receptor system read from 350 to 700 nm every 2 nm, generated from a chosen K and species spectra
 * (Gaussian bands) with small seeded noise, in three formats: a long table, the spectrum CSV (one column
 * per cuvette) and JCAMP-DX (one linked file with a block per cuvette, and single-block files). The same
 * spectra are the demo's scanning-spectrophotometer run SP-7 (samples/demo/spectra, exports/scanner-1): its
 * manifest and two JCAMP-DX exports (blanks and the Job's series, then the receptor-excess series).
 * Run: npx tsx scripts/make-spectral-samples.ts
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { parseStoichiometry, seededRandom, solveEquilibrium } from '../server/src/analysis';

const OUT = resolve(__dirname, '../samples/analysis');
const JCAMP_OUT = resolve(OUT, 'spectra-jcamp');
/** The true values the files are generated from (what the CLI should find). */
export const TRUE_K_PER_M = 2000;
const FROM_NM = 350;
const TO_NM = 700;
const STEP_NM = 2;
const BACKGROUND = (nm: number): number => 0.03 + 0.00002 * (700 - nm);
const NOISE_SD = 0.0015;
const rng = seededRandom(20261202);
const model = parseStoichiometry('1:1');

const band = (centreNm: number, height: number, widthNm: number) => (nm: number) =>
  height * Math.exp(-((nm - centreNm) ** 2) / (2 * widthNm * widthNm));
const wavelengths: number[] = [];
for (let nm = FROM_NM; nm <= TO_NM; nm += STEP_NM) wavelengths.push(nm);
/** Invented spectra, L·mol⁻¹·cm⁻¹: dye A one band, receptor B one band, the complex two bands. */
const epsA = wavelengths.map(band(430, 900, 28));
const epsB = wavelengths.map(band(375, 600, 22));
const epsC = wavelengths.map((nm) => band(490, 2600, 32)(nm) + band(575, 1700, 28)(nm));

interface Row {
  position: string;
  sampleId: string;
  role: 'blank' | 'mixture';
  stockAM?: number;
  volumeAMl?: number;
  stockBM?: number;
  volumeBMl?: number;
  totalVolumeMl?: number;
  replicateGroup?: string;
  spectrum: number[];
}

const rows: Row[] = [];
let next = 1;
const pos = (): string => `C${next++}`;
const spectrumOf = (a0: number, b0: number): number[] => {
  const s = solveEquilibrium(TRUE_K_PER_M, a0, b0, model);
  return wavelengths.map(
    (nm, j) =>
      BACKGROUND(nm) +
      epsA[j] * s.aFreeM +
      epsB[j] * s.bFreeM +
      epsC[j] * s.productM +
      NOISE_SD * rng.normal(),
  );
};
for (let i = 0; i < 4; i++)
  rows.push({
    position: pos(),
    sampleId: 'BLK',
    role: 'blank',
    replicateGroup: 'BLK',
    spectrum: wavelengths.map((nm) => BACKGROUND(nm) + NOISE_SD * rng.normal()),
  });
// Job's series: stocks 2.00 mM, 5.00 mL of reactants made up to 10.00 mL (A₀ + B₀ = 1.00 mM).
const stockM = 2e-3;
for (let i = 1; i <= 9; i++) {
  const volumeBMl = 0.5 * i;
  const volumeAMl = 5 - volumeBMl;
  rows.push({
    position: pos(),
    sampleId: `JOB-${i}`,
    role: 'mixture',
    stockAM: stockM,
    volumeAMl,
    stockBM: stockM,
    volumeBMl,
    totalVolumeMl: 10,
    spectrum: spectrumOf((stockM * volumeAMl) / 10, (stockM * volumeBMl) / 10),
  });
}
// Receptor-excess series: 1.00 mL of 2.00 mM dye, 10.0 mM receptor, to 10.00 mL.
for (const [i, volumeBMl] of [0.1, 0.2, 0.35, 0.5, 0.75, 1.0].entries()) {
  rows.push({
    position: pos(),
    sampleId: `XS-${i + 1}`,
    role: 'mixture',
    stockAM: stockM,
    volumeAMl: 1,
    stockBM: 1e-2,
    volumeBMl,
    totalVolumeMl: 10,
    spectrum: spectrumOf((stockM * 1) / 10, (1e-2 * volumeBMl) / 10),
  });
}

const num = (v: number | undefined): string => (v === undefined ? '' : Number(v.toPrecision(6)).toString());
const a4 = (v: number): string => v.toFixed(4);
const manifest = [
  'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group',
  ...rows.map((r) =>
    [
      r.position,
      r.sampleId,
      r.role,
      '',
      '',
      num(r.stockAM),
      num(r.volumeAMl),
      num(r.stockBM),
      num(r.volumeBMl),
      num(r.totalVolumeMl),
      r.replicateGroup ?? '',
    ].join(','),
  ),
];
const longTable = [
  'position,wavelength_nm,absorbance',
  ...rows.flatMap((r) => wavelengths.map((nm, j) => `${r.position},${nm},${a4(r.spectrum[j])}`)),
];
const spectrumCsv = [
  ['wavelength_nm', ...rows.map((r) => r.position)].join(','),
  ...wavelengths.map((nm, j) => [nm, ...rows.map((r) => a4(r.spectrum[j]))].join(',')),
];

/** One JCAMP-DX 4.24 UV/VIS block, (X++(Y..Y)) in plain decimals (AFFN), ten values a line. */
function jcampBlock(r: Row): string[] {
  const yFactor = 0.0001;
  const ys = r.spectrum.map((a) => Math.round(a / yFactor));
  const lines = [
    `##TITLE= ${r.position} ${r.sampleId}`,
    '##JCAMP-DX= 4.24',
    '##DATA TYPE= UV/VIS SPECTRUM',
    '##ORIGIN= Equilight invented demo data',
    '##OWNER= public domain',
    `##SAMPLE DESCRIPTION= cuvette ${r.position}, ${r.sampleId}`,
    '##PATH LENGTH= 1.0 CM',
    '##XUNITS= NANOMETERS',
    '##YUNITS= ABSORBANCE',
    '##XFACTOR= 1',
    `##YFACTOR= ${yFactor}`,
    `##FIRSTX= ${FROM_NM}`,
    `##LASTX= ${TO_NM}`,
    `##NPOINTS= ${wavelengths.length}`,
    `##FIRSTY= ${ys[0]}`,
    '##XYDATA= (X++(Y..Y))',
  ];
  for (let j = 0; j < ys.length; j += 10) lines.push([wavelengths[j], ...ys.slice(j, j + 10)].join(' '));
  lines.push('##END=');
  return lines;
}
/** JCAMP-DX linked blocks (`##BLOCKS=`), one block per cuvette. */
const linkedFile = (title: string, of: readonly Row[]): string[] => [
  `##TITLE= ${title}`,
  '##JCAMP-DX= 4.24',
  '##DATA TYPE= LINK',
  `##BLOCKS= ${of.length}`,
  ...of.flatMap((r, i) => [...jcampBlock(r).slice(0, 1), `##BLOCK_ID= ${i + 1}`, ...jcampBlock(r).slice(1)]),
  '##END=',
];
const linked = linkedFile('Invented dye-receptor run, cuvettes C1-C19', rows);

writeFileSync(resolve(OUT, 'spectra-manifest.csv'), manifest.join('\n') + '\n');
writeFileSync(resolve(OUT, 'spectra-long.csv'), longTable.join('\n') + '\n');
writeFileSync(resolve(OUT, 'spectra.csv'), spectrumCsv.join('\n') + '\n');
writeFileSync(resolve(OUT, 'spectra.jdx'), linked.join('\n') + '\n');
mkdirSync(JCAMP_OUT, { recursive: true });
for (const r of rows.slice(0, 4))
  writeFileSync(resolve(JCAMP_OUT, `${r.position}.jdx`), jcampBlock(r).join('\n') + '\n');
// The demo scenario's scanning-spectrophotometer run SP-7: the same spectra, in two exports.
const DEMO = resolve(__dirname, '../samples/demo');
mkdirSync(resolve(DEMO, 'spectra'), { recursive: true });
mkdirSync(resolve(DEMO, 'exports/scanner-1'), { recursive: true });
writeFileSync(resolve(DEMO, 'spectra/manifest.csv'), manifest.join('\n') + '\n');
const part1 = rows.filter((r) => !r.sampleId.startsWith('XS-'));
const part2 = rows.filter((r) => r.sampleId.startsWith('XS-'));
writeFileSync(
  resolve(DEMO, 'exports/scanner-1/SP-7-part1.jdx'),
  linkedFile('Run SP-7 part 1: blanks and Job series (invented demo data)', part1).join('\n') + '\n',
);
writeFileSync(
  resolve(DEMO, 'exports/scanner-1/SP-7-part2.jdx'),
  linkedFile('Run SP-7 part 2: receptor-excess series (invented demo data)', part2).join('\n') + '\n',
);
console.log(`wrote ${rows.length} positions × ${wavelengths.length} wavelengths to ${OUT}`);
