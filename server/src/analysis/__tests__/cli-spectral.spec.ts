import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { runAnalyzeCli } from '../../testing/analyze-cli';

// The CLI's whole-spectrum option (--all-wavelengths, --from, --to) on the invented spectra of
// samples/analysis (scripts/make-spectral-samples.ts) and on spectra written here from a closed form.

const ROOT = resolve(__dirname, '../../../..');
const SAMPLES = resolve(ROOT, 'samples/analysis');
const LONG = join(SAMPLES, 'spectra-long.csv');
const SPECTRUM = join(SAMPLES, 'spectra.csv');
const JCAMP = join(SAMPLES, 'spectra.jdx');
const SPECTRA_MANIFEST = join(SAMPLES, 'spectra-manifest.csv');
/** The K the sample files were generated with (scripts/make-spectral-samples.ts), L/mol. */
const SAMPLE_TRUE_K = 2000;

interface SpectralCandidate {
  model: string;
  K: number | null;
  K_ci95: [number | null, number | null] | null;
  K_unit: string;
  K_status: string;
  aic: number | null;
  converged: boolean;
}
interface SpectralJson {
  species_count: number;
  singular_values: number[];
  wavelength_range_nm: [number, number];
  n_wavelengths: number;
  n_mixtures: number;
  candidates: SpectralCandidate[];
  best: string | null;
  single_wavelength_nm: number;
}
interface CliJson {
  wavelength_nm: number;
  headline: { model: string; K: number } | null;
  spectral?: SpectralJson;
  warnings: string[];
}

const run = (args: string[]) => runAnalyzeCli(args);

function runJson(args: string[]): CliJson {
  const r = run([...args, '--json']);
  if (r.status !== 0) throw new Error(`exit ${r.status}: ${r.stderr}`);
  return JSON.parse(r.stdout) as CliJson;
}

function expectUsageError(args: string[], pattern: RegExp): void {
  const r = run(args);
  expect(r.status).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trim().split('\n');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(pattern);
}

function spectralOf(out: CliJson): SpectralJson {
  if (!out.spectral) throw new Error('no "spectral" in the JSON');
  return out.spectral;
}

function candidate(s: SpectralJson, model: string): SpectralCandidate {
  const c = s.candidates.find((x) => x.model === model);
  if (!c) throw new Error(`no whole-spectrum candidate ${model}`);
  return c;
}

const tmp = mkdtempSync(join(tmpdir(), 'analyze-spectral-'));

/**
 * 1:1 complex by the closed form of the mass-action quadratic: with K = x/((A₀ − x)(B₀ − x)),
 * x = [(A₀ + B₀ + 1/K) − √((A₀ + B₀ + 1/K)² − 4A₀B₀)]/2 (Connors K.A., Binding Constants, Wiley 1987,
 * ch. 2; Thordarson P., Chem. Soc. Rev. 40 (2011) 1305, the 1:1 host–guest equation — from memory).
 */
function complexOneToOne(k: number, a0: number, b0: number): number {
  const s = a0 + b0 + 1 / k;
  return (s - Math.sqrt(s * s - 4 * a0 * b0)) / 2;
}

/**
 * Writes spectra (spectrum CSV, one column per cuvette) of mixtures of A and B made from 0.01 mol/L stocks
 * to 10 mL, computed by Beer–Lambert with the closed form above and a fixed deterministic noise; returns
 * the CLI arguments. Species spectra: Gaussian bands (invented).
 */
function writeClosedFormSpectra(k: number): string[] {
  const wl = Array.from({ length: 41 }, (_, j) => 400 + 5 * j);
  const band = (c: number, h: number, w: number) => (nm: number) =>
    h * Math.exp(-((nm - c) ** 2) / (2 * w * w));
  const epsA = wl.map(band(430, 700, 30));
  const epsC = wl.map((nm) => band(500, 2200, 35)(nm) + band(560, 1200, 25)(nm));
  const mixtures: [number, number][] = [];
  for (let i = 1; i <= 8; i++) mixtures.push([1e-3 * (1 - i / 9), 1e-3 * (i / 9)]);
  for (const b0 of [2e-4, 4e-4, 8e-4, 1.6e-3, 3.2e-3]) mixtures.push([2e-4, b0]);
  // Deterministic pseudo-random noise, uniform, SD ≈ 0.0014 (a hash of the indices, not a smooth function).
  const noise = (i: number, j: number): number => {
    const v = Math.sin(12.9898 * (i + 1) + 78.233 * (j + 1)) * 43758.5453;
    return 0.005 * (v - Math.floor(v) - 0.5);
  };
  const columns: number[][] = [wl.map((_, j) => noise(0, j)), wl.map((_, j) => noise(1, j))];
  for (const [i, [a0, b0]] of mixtures.entries()) {
    const x = complexOneToOne(k, a0, b0);
    columns.push(wl.map((_, j) => epsA[j] * (a0 - x) + epsC[j] * x + noise(i + 2, j)));
  }
  const positions = columns.map((_, i) => `C${i + 1}`);
  const csv = [
    ['wavelength_nm', ...positions].join(','),
    ...wl.map((nm, j) => [nm, ...columns.map((c) => c[j].toFixed(5))].join(',')),
  ];
  const manifest = [
    'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group',
    'C1,BLK,blank,,,,,,,,BLK',
    'C2,BLK,blank,,,,,,,,BLK',
    ...mixtures.map(
      ([a0, b0], i) =>
        `C${i + 3},MIX-${i + 1},mixture,,,0.01,${((a0 / 0.01) * 10).toPrecision(8)},0.01,${((b0 / 0.01) * 10).toPrecision(8)},10,`,
    ),
  ];
  const r = join(tmp, 'closed-form-spectra.csv');
  const m = join(tmp, 'closed-form-manifest.csv');
  writeFileSync(r, csv.join('\n') + '\n');
  writeFileSync(m, manifest.join('\n') + '\n');
  return ['--readings', r, '--format', 'spectrum', '--manifest', m];
}

describe('npm run analyze --all-wavelengths (whole-spectrum K)', () => {
  jest.setTimeout(180_000);

  it('finds K of a 1:1 system from spectra computed by the closed-form 1:1 equation, within its interval', () => {
    const kTrue = 650;
    const s = spectralOf(
      runJson([...writeClosedFormSpectra(kTrue), '--all-wavelengths', '--candidates', '1:1,1:2']),
    );
    expect(s.best).toBe('1:1');
    // A and the complex absorb, B does not: two absorbing species in the mixtures.
    expect(s.species_count).toBe(2);
    const c = candidate(s, '1:1');
    expect(c.converged).toBe(true);
    expect(c.K_status).toBe('determined');
    const [lo, hi] = c.K_ci95 as [number, number];
    expect(lo).toBeLessThan(kTrue);
    expect(hi).toBeGreaterThan(kTrue);
    expect(Math.abs((c.K as number) - kTrue) / kTrue).toBeLessThan(0.05);
    expect(c.K_unit).toBe('L·mol⁻¹');
    expect(s.wavelength_range_nm).toEqual([400, 600]);
    expect(s.n_wavelengths).toBe(41);
  });

  it('adds "spectral" with the documented keys for the invented sample, K within its interval, the range honoured', () => {
    const out = runJson([
      '--readings',
      LONG,
      '--manifest',
      SPECTRA_MANIFEST,
      '--all-wavelengths',
      '--from',
      '400',
      '--to',
      '700',
    ]);
    const s = spectralOf(out);
    for (const key of ['species_count', 'singular_values', 'candidates', 'best'])
      expect(s).toHaveProperty(key);
    // A, B and the complex absorb in the invented system.
    expect(s.species_count).toBe(3);
    expect(s.singular_values.length).toBeGreaterThanOrEqual(3);
    expect(s.wavelength_range_nm).toEqual([400, 700]);
    expect(s.n_wavelengths).toBe(151);
    expect(s.n_mixtures).toBe(15);
    expect(s.best).toBe('1:1');
    expect(s.candidates.map((c) => c.model)).toEqual(['1:1', '1:2', '2:1', '1:3']);
    const c = candidate(s, '1:1');
    for (const key of ['model', 'K', 'K_ci95', 'K_unit', 'aic', 'converged']) expect(c).toHaveProperty(key);
    const [lo, hi] = c.K_ci95 as [number, number];
    expect(lo).toBeLessThan(SAMPLE_TRUE_K);
    expect(hi).toBeGreaterThan(SAMPLE_TRUE_K);
    // The single-wavelength analysis still runs, at a wavelength inside the range, and says so.
    expect(out.wavelength_nm).toBe(s.single_wavelength_nm);
    expect(out.wavelength_nm).toBeGreaterThanOrEqual(400);
    expect(out.warnings.join('\n')).toMatch(/single-wavelength analysis at \d+ nm/);

    const narrow = spectralOf(
      runJson([
        '--readings',
        LONG,
        '--manifest',
        SPECTRA_MANIFEST,
        '--all-wavelengths',
        '--from',
        '451',
        '--to',
        '600',
        '--candidates',
        '1:1',
        '--wavelength',
        '500',
      ]),
    );
    expect(narrow.wavelength_range_nm).toEqual([452, 600]);
    expect(narrow.n_wavelengths).toBe(75);
    expect(narrow.single_wavelength_nm).toBe(500);
  });

  it('reads the same spectra from the spectrum CSV and from JCAMP-DX linked blocks', () => {
    const args = [
      '--manifest',
      SPECTRA_MANIFEST,
      '--all-wavelengths',
      '--candidates',
      '1:1',
      '--wavelength',
      '500',
    ];
    const long = spectralOf(runJson(['--readings', LONG, ...args]));
    const csv = spectralOf(runJson(['--readings', SPECTRUM, '--format', 'spectrum', ...args]));
    const jdx = spectralOf(runJson(['--readings', JCAMP, '--format', 'jcamp-dx', ...args]));
    for (const other of [csv, jdx]) {
      expect(other.n_wavelengths).toBe(176);
      expect(other.species_count).toBe(long.species_count);
      expect(candidate(other, '1:1').K).toBeCloseTo(candidate(long, '1:1').K as number, 6);
    }
  });

  it('leaves the output as it was without --all-wavelengths', () => {
    const r = run(['--readings', LONG, '--manifest', SPECTRA_MANIFEST, '--json']);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/holds readings at 176 wavelengths .*choose one with --wavelength/);
    const out = runJson(['--readings', LONG, '--manifest', SPECTRA_MANIFEST, '--wavelength', '500']);
    expect(out).not.toHaveProperty('spectral');
    expect(out.wavelength_nm).toBe(500);
  });

  it('refuses bad whole-spectrum options with one clear line', () => {
    const base = ['--readings', LONG, '--manifest', SPECTRA_MANIFEST];
    expectUsageError(
      [...base, '--all-wavelengths', '--from', '700', '--to', '400'],
      /--from 700 nm must be below --to 400 nm/,
    );
    expectUsageError(
      [...base, '--from', '400'],
      /--from limits the whole-spectrum fit: it needs --all-wavelengths/,
    );
    expectUsageError([...base, '--all-wavelengths', '--to', '-3'], /--to must be a positive number \(nm\)/);
    expectUsageError(
      [...base, '--all-wavelengths', '--from', '800', '--to', '900'],
      /no wavelength within 800–900 nm; it holds 350–700 nm \(176 wavelengths\)/,
    );
    expectUsageError(
      [
        '--readings',
        join(SAMPLES, 'readings.csv'),
        '--manifest',
        join(SAMPLES, 'manifest.csv'),
        '--all-wavelengths',
      ],
      /--all-wavelengths needs spectra: readings.csv holds readings at one wavelength \(640 nm\)/,
    );
    expectUsageError(
      [...base, '--format', 'jdx'],
      /--format must be long-table, plate-grid, spectrum or jcamp-dx/,
    );
  });

  it('documents the new options in --help', () => {
    const r = run(['--help']);
    expect(r.status).toBe(0);
    for (const flag of ['--all-wavelengths', '--from <nm>', '--to <nm>', 'jcamp-dx'])
      expect(r.stdout).toContain(flag);
    // The sample README shows the command it documents.
    expect(readFileSync(join(SAMPLES, 'README.md'), 'utf8')).toContain('--all-wavelengths');
  });
});
