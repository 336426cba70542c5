import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { solveEquilibrium } from '../equilibrium-solve';
import { parseStoichiometry } from '../stoichiometry-model';
import { runAnalyzeCli, runAnalyzeCliSource } from '../../testing/analyze-cli';

const ROOT = resolve(__dirname, '../../../..');
const SAMPLES = resolve(ROOT, 'samples/analysis');
const READINGS = join(SAMPLES, 'readings.csv');
const MANIFEST = join(SAMPLES, 'manifest.csv');

const run = (args: string[]) => runAnalyzeCli(args, 60_000);

/**
 * One candidate in the CLI's JSON, as these tests read it: values typed as present because each test
 * knows which it expects, and checks null with toBeNull where it expects none.
 */
interface CliCandidate {
  model: string;
  K_mean: number;
  fitK: number;
  fitK_ci95: [number, number];
  K: number;
  K_ci95: [number, number];
  K_unit: string;
  K_status: string;
  K_lower_bound_95: number;
  K_upper_bound_95: number;
  K_text: string;
  delta_aic: number;
  converged: boolean;
  epsilon_held: boolean;
  epsilon: number;
  baseline: number;
  per_mixture_n: number;
  warnings: string[];
}

/** The CLI's JSON, as these tests read it (see CliCandidate). */
interface CliJson {
  wavelength_nm: number;
  path_length_cm: number;
  settings: {
    candidates: string[];
    calibration_model: string;
    linear_range_max_absorbance: number;
    fit_baseline: boolean;
    exclusions: { position: string; reason: string }[];
    mc_draws: number;
    mc_seed: number;
  };
  calibration: Record<string, number>;
  epsilon_source: { kind: string; epsilon: number | null; epsilon_se: number | null; note: string };
  unknowns: Record<string, unknown>[];
  mixtures: { sample_id: string; product_M: number }[];
  headline: { K: number; K_status: string; K_text: string } & Record<string, unknown>;
  k_note: string;
  stoichiometry: CliCandidate[];
  best: string | null;
  uncertainty: { mc_draws: number; K_mc_ci95: [number, number] };
  job: { nearest_model: string | null };
  mole_ratio: Record<string, unknown> | null;
  qc: { code: string; threshold: number | null }[];
  warnings: string[];
}

/** The candidate of one model (fails the test when it is missing). */
function candidate(out: CliJson, model: string): CliCandidate {
  const c = out.stoichiometry.find((x) => x.model === model);
  if (!c) throw new Error(`no candidate ${model} in the JSON`);
  return c;
}

/** Runs with --json and returns the parsed object (fails the test on a non-zero exit). */
function runJson(args: string[]): CliJson {
  const r = run([...args, '--json']);
  if (r.status !== 0) throw new Error(`exit ${r.status}: ${r.stderr}`);
  return JSON.parse(r.stdout) as CliJson;
}

/** A usage error: exit 2, nothing on stdout, one line on stderr. */
function expectUsageError(args: string[], pattern: RegExp): void {
  const r = run(args);
  expect(r.status).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trim().split('\n');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(pattern);
}

const tmp = mkdtempSync(join(tmpdir(), 'analyze-'));

/**
 * 1:1 complex by the closed form of the mass-action quadratic: with K = x/((A₀ − x)(B₀ − x)),
 * x = [(A₀ + B₀ + 1/K) − √((A₀ + B₀ + 1/K)² − 4A₀B₀)]/2 (Connors K.A., Binding Constants, Wiley 1987,
 * ch. 2; Thordarson P., Chem. Soc. Rev. 40 (2011) 1305, the 1:1 host–guest equation — from memory).
 */
function complexOneToOne(k: number, a0: number, b0: number): number {
  const s = a0 + b0 + 1 / k;
  return (s - Math.sqrt(s * s - 4 * a0 * b0)) / 2;
}

/** Small fixed "noise", absorbance units (SD ≈ 0.0012): the same in every run. */
const NOISE = [
  0.0012, -0.0015, 0.0004, 0.0019, -0.0008, -0.0013, 0.001, -0.0003, 0.0016, -0.0011, 0.0006, -0.0018,
];

interface InventedMixture {
  a0M: number;
  b0M: number;
  absorbance: number;
}

/**
 * Writes an invented cuvette run (two solvent blanks, then mixtures made from 0.01 mol/L stocks to
 * 10 mL) as a long-table readings CSV and a manifest CSV; returns their paths.
 */
function writeInventedRun(name: string, mixtures: InventedMixture[], wavelengthNm = 520): string[] {
  const readings = ['position,wavelength_nm,absorbance'];
  const manifest = [
    'position,sample_id,role,concentration_M,dilution_factor,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL,replicate_group',
    'C1,BLK,blank,,,,,,,,BLK',
    'C2,BLK,blank,,,,,,,,BLK',
  ];
  readings.push(`C1,${wavelengthNm},0.0002`, `C2,${wavelengthNm},-0.0002`);
  mixtures.forEach((m, i) => {
    const pos = `C${i + 3}`;
    const va = ((m.a0M / 0.01) * 10).toPrecision(6);
    const vb = ((m.b0M / 0.01) * 10).toPrecision(6);
    manifest.push(`${pos},MIX-${i + 1},mixture,,,0.01,${va},0.01,${vb},10,`);
    readings.push(`${pos},${wavelengthNm},${m.absorbance.toFixed(4)}`);
  });
  const r = join(tmp, `${name}-readings.csv`);
  const mf = join(tmp, `${name}-manifest.csv`);
  writeFileSync(r, readings.join('\n') + '\n');
  writeFileSync(mf, manifest.join('\n') + '\n');
  return ['--readings', r, '--manifest', mf];
}

/** Superscript of an integer, for the expected unit text. */
const sup = (n: number): string =>
  String(n)
    .split('')
    .map((c) => '⁻⁰¹²³⁴⁵⁶⁷⁸⁹'['-0123456789'.indexOf(c)])
    .join('');

describe('npm run analyze (CLI)', () => {
  jest.setTimeout(120_000);

  it('prints one JSON object with the documented shape for the invented demo files', () => {
    const out = runJson([
      '--readings',
      READINGS,
      '--manifest',
      MANIFEST,
      '--wavelength',
      '640',
      '--path-cm',
      '1',
    ]);
    expect(Object.keys(out.calibration).sort()).toEqual(
      ['epsilon', 'intercept', 'interceptSE', 'loq', 'lod', 'n', 'r2', 'slope', 'slopeSE'].sort(),
    );
    expect(out.calibration.n).toBe(7);
    expect(out.unknowns).toHaveLength(3);
    expect(Object.keys(out.unknowns[0])).toEqual(
      expect.arrayContaining(['sample_id', 'concentration_M', 'se_M']),
    );
    expect(out.mixtures).toHaveLength(15);
    expect(Object.keys(out.mixtures[0])).toEqual(['sample_id', 'a0_M', 'b0_M', 'product_M']);
    const first = out.stoichiometry[0];
    expect(first.model).toBe('1:1');
    for (const k of ['K_mean', 'K_sd', 'K_cv', 'aic', 'fitK', 'fitK_ci95', 'fitEpsilon'])
      expect(first).toHaveProperty(k);
    for (const k of [
      'K',
      'K_ci95',
      'K_unit',
      'K_status',
      'K_lower_bound_95',
      'K_upper_bound_95',
      'K_text',
      'delta_aic',
      'converged',
      'epsilon_held',
      'warnings',
    ])
      expect(first).toHaveProperty(k);
    expect(first.fitK_ci95).toHaveLength(2);
    expect(first.K_status).toBe('determined');
    expect(first.K).toBe(first.fitK);
    expect(first.K_ci95).toEqual(first.fitK_ci95);
    expect(first.delta_aic).toBe(0);
    expect(first.converged).toBe(true);
    expect(first.epsilon_held).toBe(true);
    expect(out.best).toBe('1:1');
    expect(Array.isArray(out.warnings)).toBe(true);
    // The demo was generated with K = 850 L/mol (invented): the 95 % interval must contain it.
    expect(first.fitK_ci95[0]).toBeLessThan(850);
    expect(first.fitK_ci95[1]).toBeGreaterThan(850);
    expect(out.headline).toEqual({
      model: '1:1',
      K: first.K,
      K_ci95: first.K_ci95,
      K_unit: 'L·mol⁻¹',
      K_status: 'determined',
      K_text: first.K_text,
      epsilon_held: true,
    });
    expect(out.headline.K_text).toMatch(/^\d+(\.\d+)? L·mol⁻¹ \(95 % CI /);
    expect(out.k_note).toMatch(/concentration constant/);
    expect(out.epsilon_source.kind).toBe('standards');
    expect(out.epsilon_source.epsilon).toBe(out.calibration.epsilon);
    expect(out.mole_ratio).toEqual(expect.objectContaining({ fixed: 'A', n: expect.any(Number) }));
    expect(out.job.nearest_model).toBe('1:1');
  });

  it('prints a summary with units, each candidate with its K, ΔAIC and notes, and the K note once', () => {
    const r = run(['--readings', READINGS, '--manifest', MANIFEST]);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/Verdict: 1:1 fits best/);
    expect(r.stdout).toMatch(/^Wavelength 640 nm; path length 1 cm;/m);
    expect(r.stdout).toMatch(/ε = [\d.]+ ± [\d.]+ L·mol⁻¹·cm⁻¹/);
    expect(r.stdout).toMatch(/SMP-017: .* mol\/L \(dilution ×1\)/);
    expect(r.stdout).toMatch(/^ε of the complex: .*L·mol⁻¹·cm⁻¹ — ε from this batch’s standards/m);
    expect(r.stdout).toMatch(
      /^ {2}1\. 1:1: K = \d+(\.\d+)? L·mol⁻¹ \(95 % CI .*\); ΔAIC 0\.0; ε .* L·mol⁻¹·cm⁻¹ \(held\)/m,
    );
    expect(r.stdout).toMatch(/^ {2}2\. 1:2: K .*L²·mol⁻².*; ΔAIC \d+\.\d/m);
    expect(r.stdout).toMatch(/^ {2}\d\. 1:3: K > .* L³·mol⁻³ \(95 % lower bound/m);
    expect(r.stdout).toMatch(/^ {7}note: 1:1 with ε fitted too \(cross-check\)/m);
    expect(r.stdout).toMatch(/^K \(1:1\): \d+(\.\d+)? L·mol⁻¹ \(95 % CI/m);
    expect(r.stdout.match(/concentration constant/g)).toHaveLength(1);
    expect(r.stdout).toMatch(/^Job's plot \(9 mixtures\): maximum at x_B = 0\.\d+ \(nearest 1:1\)/m);
    expect(r.stdout).toMatch(/^Mole-ratio series \(\d+ mixtures, A held at .* mol\/L\)/m);
    // The best candidate's notes are printed under it, not again as warnings.
    expect(r.stdout).not.toMatch(/^Warning: 1:1 with ε fitted too/m);
  });

  it('when run as `npm run analyze` (tsx on the source) then it prints what the bundled run prints', () => {
    const viaTsx = runAnalyzeCliSource(['--help']);
    expect(viaTsx.status).toBe(0);
    expect(viaTsx.stdout).toBe(run(['--help']).stdout);
  });

  it('--help prints every option with a line each and exits 0', () => {
    const r = run(['--help']);
    expect(r.status).toBe(0);
    expect(r.stderr).toBe('');
    for (const option of [
      '--readings',
      '--manifest',
      '--format',
      '--plate',
      '--wavelength',
      '--path-cm',
      '--epsilon',
      '--epsilon-se',
      '--candidates',
      '--through-origin',
      '--ceiling',
      '--exclude',
      '--fit-baseline',
      '--mc',
      '--seed',
      '--json',
      '--help',
    ]) {
      expect(r.stdout).toMatch(new RegExp(`^ {2}${option}( <[^>]+>)? +\\S`, 'm'));
    }
  });

  const usageCases: [string[], RegExp][] = [
    [['--bogus'], /^analyze: unknown option --bogus \(see --help\)$/],
    [['--readings', READINGS, '--manifest', MANIFEST, '--json=yes'], /--json takes no value/],
    [['--readings', READINGS], /--readings <file> and --manifest <file> are required/],
    [['--readings', READINGS, '--manifest'], /--manifest needs a value/],
    [['--readings', READINGS, '--manifest', MANIFEST, 'extra'], /unexpected argument extra/],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--candidates', '1:x'],
      /--candidates: "1:x" is not a stoichiometry/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--candidates', '1:1,0:2'],
      /"0:2" is not a stoichiometry/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--epsilon', '0'],
      /--epsilon must be a positive number \(L·mol⁻¹·cm⁻¹\)/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--epsilon', '-1250'],
      /--epsilon must be a positive number/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--epsilon', 'lots'],
      /--epsilon needs a number, got "lots"/,
    ],
    [['--readings', READINGS, '--manifest', MANIFEST, '--epsilon-se', '5'], /--epsilon-se needs --epsilon/],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--ceiling', '0'],
      /--ceiling must be a positive number \(absorbance\)/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--ceiling', '-1'],
      /--ceiling must be a positive number/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--path-cm', '0'],
      /--path-cm must be a positive number \(cm\)/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--exclude', 'Z9'],
      /--exclude: "Z9" is not a position/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--exclude', 'C3,,C4'],
      /--exclude: "" is not a position/,
    ],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--exclude', 'C3,C99'],
      /--exclude: C99 not in manifest\.csv/,
    ],
    [['--readings', READINGS, '--manifest', MANIFEST, '--mc', '5'], /--mc needs an integer ≥ 10/],
    [['--readings', READINGS, '--manifest', MANIFEST, '--mc', '20.5'], /--mc needs an integer, got "20\.5"/],
    [['--readings', READINGS, '--manifest', MANIFEST, '--seed', '3'], /--seed needs --mc/],
    [['--readings', READINGS, '--manifest', MANIFEST, '--plate', '48'], /--plate must be 96, 384 or cuvette/],
    [
      ['--readings', READINGS, '--manifest', MANIFEST, '--format', 'xml'],
      /--format must be long-table, plate-grid, spectrum or jcamp-dx/,
    ],
  ];
  /** The command as a person types it, for the test title. */
  const title = (args: string[]): string =>
    args.map((a) => (a === READINGS ? 'readings.csv' : a === MANIFEST ? 'manifest.csv' : a)).join(' ');
  it.each(usageCases.map(([args, pattern]) => [title(args), args, pattern] as const))(
    'analyze %s exits 2 with one line',
    (_title, args, pattern) => {
      expectUsageError([...args], pattern);
    },
  );

  describe('wavelength', () => {
    // The demo readings at 640 nm, and the same again at 550 nm (half the absorbance): invented.
    const twoWavelengths = join(tmp, 'two-wavelengths.csv');
    beforeAll(() => {
      const lines = readFileSync(READINGS, 'utf8').trim().split('\n');
      const extra = lines.slice(1).map((l) => {
        const [pos, , a, ...rest] = l.split(',');
        return [pos, '550', (Number(a) / 2).toFixed(4), ...rest].join(',');
      });
      writeFileSync(twoWavelengths, [...lines, ...extra].join('\n') + '\n');
    });

    it('a --wavelength with no readings exits 2 and lists the wavelengths present', () => {
      expectUsageError(
        ['--readings', READINGS, '--manifest', MANIFEST, '--wavelength', '600'],
        /--wavelength 600: readings\.csv has no readings there; wavelengths present: 640 nm$/,
      );
      expectUsageError(
        ['--readings', twoWavelengths, '--manifest', MANIFEST, '--wavelength', '500'],
        /wavelengths present: 550, 640 nm$/,
      );
    });

    it('readings at several wavelengths with none chosen exit 2 and list them (no silent choice)', () => {
      expectUsageError(
        ['--readings', twoWavelengths, '--manifest', MANIFEST],
        /two-wavelengths\.csv holds readings at 2 wavelengths \(550, 640 nm\); choose one with --wavelength$/,
      );
    });

    it('--format spectrum reads a wavelength column and one column per position', () => {
      // The same invented readings as a spectrum table: 550 and 640 nm, one column per cuvette.
      const rows = readFileSync(READINGS, 'utf8')
        .trim()
        .split('\n')
        .slice(1)
        .map((l) => l.split(','));
      const spectrum = join(tmp, 'spectrum.csv');
      writeFileSync(
        spectrum,
        [
          ['wavelength_nm', ...rows.map((r) => r[0])].join(','),
          ['550', ...rows.map((r) => (Number(r[2]) / 2).toFixed(4))].join(','),
          ['640', ...rows.map((r) => r[2])].join(','),
        ].join('\n') + '\n',
      );
      expectUsageError(
        ['--readings', spectrum, '--manifest', MANIFEST, '--format', 'spectrum'],
        /spectrum\.csv holds readings at 2 wavelengths \(550, 640 nm\)/,
      );
      const fromSpectrum = runJson([
        '--readings',
        spectrum,
        '--manifest',
        MANIFEST,
        '--format',
        'spectrum',
        '--plate',
        'cuvette',
        '--wavelength',
        '640',
      ]);
      const fromLongTable = runJson(['--readings', READINGS, '--manifest', MANIFEST]);
      expect(fromSpectrum.calibration.slope).toBe(fromLongTable.calibration.slope);
      expect(fromSpectrum.headline.K).toBe(fromLongTable.headline.K);
    });

    it('the chosen one is analysed', () => {
      const at550 = runJson(['--readings', twoWavelengths, '--manifest', MANIFEST, '--wavelength', '550']);
      const at640 = runJson(['--readings', twoWavelengths, '--manifest', MANIFEST, '--wavelength', '640']);
      expect(at550.wavelength_nm).toBe(550);
      expect(at640.wavelength_nm).toBe(640);
      // Half the absorbance at 550 nm: half the slope (Beer–Lambert, A = ε·l·c is linear in ε).
      expect(at550.calibration.slope / at640.calibration.slope).toBeCloseTo(0.5, 2);
    });
  });

  it('--candidates limits the models; K_unit follows the stoichiometry', () => {
    const out = runJson(['--readings', READINGS, '--manifest', MANIFEST, '--candidates', '1:1, 1:2']);
    expect(out.settings.candidates).toEqual(['1:1', '1:2']);
    expect(out.stoichiometry.map((c) => c.model).sort()).toEqual(['1:1', '1:2']);
    const unit = (m: string): string => candidate(out, m).K_unit;
    // K = [AₐB_b]/([A]^a·[B]^b) has the unit (mol/L)^(1−a−b) (IUPAC Gold Book, "stability constant"; from memory).
    expect(unit('1:1')).toBe(`L·mol${sup(-1)}`);
    expect(unit('1:2')).toBe(`L${sup(2)}·mol${sup(-2)}`);
  });

  it('--through-origin fits A = S·c with S = Σxy/Σx² and reports the setting', () => {
    const out = runJson(['--readings', READINGS, '--manifest', MANIFEST, '--through-origin']);
    expect(out.settings.calibration_model).toBe('through-origin');
    expect(out.calibration.intercept).toBe(0);
    // Least squares through the origin, S = Σ(c·A)/Σc² (Draper & Smith, Applied Regression Analysis,
    // 3rd ed. 1998, §3.9 — from memory), computed here from the files: blank-corrected standards.
    const rows = (f: string): string[][] =>
      readFileSync(f, 'utf8')
        .trim()
        .split('\n')
        .slice(1)
        .map((l) => l.split(','));
    const absorbance = new Map(rows(READINGS).map((r) => [r[0], Number(r[2])]));
    const manifest = rows(MANIFEST);
    const blanks = manifest.filter((r) => r[2] === 'blank').map((r) => absorbance.get(r[0]) as number);
    const blank = blanks.reduce((s, v) => s + v, 0) / blanks.length;
    const standards = manifest
      .filter((r) => r[2] === 'standard')
      .map((r) => ({ c: Number(r[3]), a: (absorbance.get(r[0]) as number) - blank }));
    const slope = standards.reduce((s, p) => s + p.c * p.a, 0) / standards.reduce((s, p) => s + p.c * p.c, 0);
    expect(out.calibration.slope).toBeCloseTo(slope, 6);
  });

  it('--path-cm scales ε: the same absorbances over half the path mean twice the ε (A = ε·l·c)', () => {
    const full = runJson(['--readings', READINGS, '--manifest', MANIFEST]);
    const half = runJson(['--readings', READINGS, '--manifest', MANIFEST, '--path-cm', '0.5']);
    expect(half.path_length_cm).toBe(0.5);
    expect(half.calibration.epsilon / full.calibration.epsilon).toBeCloseTo(2, 9);
  });

  it('--exclude leaves the positions out with a reason', () => {
    const out = runJson(['--readings', READINGS, '--manifest', MANIFEST, '--exclude', 'c3,C20']);
    expect(out.settings.exclusions).toEqual([
      { position: 'C3', reason: 'excluded on the command line' },
      { position: 'C20', reason: 'excluded on the command line' },
    ]);
    expect(out.calibration.n).toBe(6);
    const job5 = out.mixtures.find((m) => m.sample_id === 'JOB-5');
    expect(job5).toEqual(expect.objectContaining({ product_M: null }));
    expect(candidate(out, '1:1').per_mixture_n).toBe(14);
  });

  it('--ceiling sets the linear-range check', () => {
    const out = runJson(['--readings', READINGS, '--manifest', MANIFEST, '--ceiling', '0.5']);
    expect(out.settings.linear_range_max_absorbance).toBe(0.5);
    const above = out.qc.filter((f) => f.code === 'above-linear-range');
    expect(above.length).toBeGreaterThan(0);
    for (const f of above) expect(f.threshold).toBe(0.5);
    const plain = runJson(['--readings', READINGS, '--manifest', MANIFEST]);
    expect(plain.qc.filter((f) => f.code === 'above-linear-range')).toHaveLength(0);
  });

  it('--mc N --seed S gives a seeded Monte Carlo interval: the same seed the same interval', () => {
    const args = ['--readings', READINGS, '--manifest', MANIFEST, '--mc', '200'];
    const a = runJson([...args, '--seed', '7']);
    const b = runJson([...args, '--seed', '7']);
    const c = runJson([...args, '--seed', '8']);
    expect(a.settings.mc_draws).toBe(200);
    expect(a.settings.mc_seed).toBe(7);
    expect(a.uncertainty.mc_draws).toBe(200);
    expect(a.uncertainty.K_mc_ci95).toEqual(b.uncertainty.K_mc_ci95);
    expect(a.uncertainty.K_mc_ci95).not.toEqual(c.uncertainty.K_mc_ci95);
    const [lo, hi] = a.uncertainty.K_mc_ci95;
    expect(lo).toBeLessThan(a.headline.K);
    expect(hi).toBeGreaterThan(a.headline.K);
  });

  describe('K from invented mixtures (truth computed with the module’s own solveEquilibrium)', () => {
    it('solveEquilibrium agrees with the closed-form 1:1 quadratic used to check it', () => {
      const model = parseStoichiometry('1:1');
      for (const [k, a0, b0] of [
        [850, 2e-4, 1.8e-3],
        [2000, 1e-4, 4e-3],
        [1e9, 1e-3, 5e-4],
      ]) {
        const x = solveEquilibrium(k, a0, b0, model).productM;
        expect(Math.abs(x - complexOneToOne(k, a0, b0)) / x).toBeLessThan(1e-9);
      }
    });

    it('--epsilon gives per-mixture K with no standards', () => {
      // Invented: 1:1, K = 850 L·mol⁻¹, ε = 1250 L·mol⁻¹·cm⁻¹, a Job's series at 2 mmol/L plus ligand excess.
      const k = 850;
      const epsilon = 1250;
      const model = parseStoichiometry('1:1');
      const mixtures: InventedMixture[] = [];
      for (let i = 1; i <= 9; i++)
        mixtures.push({ a0M: 2e-3 * (1 - i / 10), b0M: 2e-3 * (i / 10), absorbance: 0 });
      for (const b0 of [2e-3, 4e-3, 6e-3, 8e-3]) mixtures.push({ a0M: 2e-4, b0M: b0, absorbance: 0 });
      mixtures.forEach((m, i) => {
        m.absorbance = epsilon * solveEquilibrium(k, m.a0M, m.b0M, model).productM + NOISE[i % NOISE.length];
      });
      const files = writeInventedRun('no-standards', mixtures);

      const without = runJson(files);
      expect(without.calibration).toBeNull();
      expect(without.epsilon_source.kind).toBe('none');
      expect(candidate(without, '1:1').K_mean).toBeNull();

      const out = runJson([...files, '--epsilon', String(epsilon)]);
      expect(out.epsilon_source).toEqual(expect.objectContaining({ kind: 'given', epsilon }));
      const c11 = candidate(out, '1:1');
      expect(c11.epsilon_held).toBe(true);
      expect(c11.per_mixture_n).toBe(mixtures.length);
      expect(Math.abs(c11.K_mean / k - 1)).toBeLessThan(0.1);
      expect(c11.K_ci95[0]).toBeLessThan(k);
      expect(c11.K_ci95[1]).toBeGreaterThan(k);
      expect(out.best).toBe('1:1');

      const withSe = runJson([...files, '--epsilon', String(epsilon), '--epsilon-se', '25']);
      expect(withSe.epsilon_source.epsilon_se).toBe(25);
    });

    it('a K too large to measure is null in the JSON, with K_text "> …" and each model its unit', () => {
      // Invented: 1:1 with K = 10⁹ L·mol⁻¹ at millimolar concentrations, so binding is complete.
      const k = 1e9;
      const epsilon = 400;
      const model = parseStoichiometry('1:1');
      const mixtures: InventedMixture[] = [];
      for (let i = 1; i <= 9; i++)
        mixtures.push({ a0M: 2e-3 * (1 - i / 10), b0M: 2e-3 * (i / 10), absorbance: 0 });
      mixtures.forEach((m, i) => {
        m.absorbance = epsilon * solveEquilibrium(k, m.a0M, m.b0M, model).productM + NOISE[i % NOISE.length];
      });
      const out = runJson([...writeInventedRun('complete-binding', mixtures), '--epsilon', String(epsilon)]);
      expect(out.best).toBe('1:1');
      const byModel = (m: string): CliCandidate => candidate(out, m);
      const c11 = byModel('1:1');
      expect(c11.K_status).toBe('lower-bound');
      expect(c11.K).toBeNull();
      expect(c11.fitK).toBeNull();
      expect(c11.K_lower_bound_95).toBeGreaterThan(1e4);
      expect(c11.K_lower_bound_95).toBeLessThan(k);
      expect(c11.K_upper_bound_95).toBeNull();
      expect(c11.K_text).toMatch(/^> .* L·mol⁻¹ \(95 % lower bound/);
      expect(out.headline.K).toBeNull();
      expect(out.headline.K_status).toBe('lower-bound');
      expect(out.headline.K_text).toBe(c11.K_text);
      // (mol/L)^(1−a−b) per model (IUPAC Gold Book, "stability constant"; from memory).
      expect(c11.K_unit).toBe(`L·mol${sup(-1)}`);
      expect(byModel('1:2').K_unit).toBe(`L${sup(2)}·mol${sup(-2)}`);
      expect(byModel('2:1').K_unit).toBe(`L${sup(2)}·mol${sup(-2)}`);
      expect(byModel('1:3').K_unit).toBe(`L${sup(3)}·mol${sup(-3)}`);
      for (const c of out.stoichiometry) {
        if (!['determined', 'poorly-determined'].includes(c.K_status)) expect(c.K).toBeNull();
      }
    });

    it('--fit-baseline recovers K when a reactant held constant absorbs too; the fit without it does not', () => {
      // Invented indicator titration: the indicator A is held at 0.1 mmol/L and absorbs by itself
      // (ε_A = 3000 L·mol⁻¹·cm⁻¹), the complex absorbs more (ε_C = 9000), ligand B rises; 1:1, K = 2000 L·mol⁻¹.
      // A = ε_A(A₀ − x) + ε_C·x = ε_A·A₀ + (ε_C − ε_A)·x: a constant offset of 0.300 on every mixture.
      const k = 2000;
      const a0 = 1e-4;
      const model = parseStoichiometry('1:1');
      const mixtures: InventedMixture[] = [0.05, 0.1, 0.2, 0.35, 0.5, 0.75, 1, 1.5, 2, 3, 4].map((b, i) => {
        const b0M = b * 1e-3;
        const x = solveEquilibrium(k, a0, b0M, model).productM;
        return { a0M: a0, b0M, absorbance: 3000 * (a0 - x) + 9000 * x + NOISE[i % NOISE.length] };
      });
      const files = [...writeInventedRun('indicator', mixtures), '--candidates', '1:1'];

      const plain = runJson(files);
      const p = plain.stoichiometry[0];
      expect(plain.settings.fit_baseline).toBe(false);
      expect(p.baseline).toBeNull();
      const plainMissesK =
        p.K_ci95 === null ||
        (p.K_ci95[0] !== null && p.K_ci95[0] > k) ||
        (p.K_ci95[1] !== null && p.K_ci95[1] < k);
      expect(plainMissesK).toBe(true);

      const fitted = runJson([...files, '--fit-baseline']);
      const f = fitted.stoichiometry[0];
      expect(fitted.settings.fit_baseline).toBe(true);
      expect(f.K_status).toBe('determined');
      expect(f.K_ci95[0]).toBeLessThan(k);
      expect(f.K_ci95[1]).toBeGreaterThan(k);
      expect(f.baseline).toBeCloseTo(0.3, 2);
      // The fitted ε is the change on binding, ε_C − ε_A.
      expect(f.epsilon / 6000).toBeCloseTo(1, 1);

      const text = run([...files, '--fit-baseline']);
      expect(text.status).toBe(0);
      expect(text.stdout).toMatch(/1\. 1:1: K = .* L·mol⁻¹ .*; baseline 0\.3\d* ± [\d.]+ \(absorbance\)/);
    });
  });

  it('exits with code 2 and one line naming file, row and column for a bad readings file', () => {
    const bad = join(tmp, 'bad-readings.csv');
    writeFileSync(bad, 'position,wavelength_nm,absorbance\nC1,640,0.123\nC2,640,abc\n');
    const r = run(['--readings', bad, '--manifest', MANIFEST, '--json']);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/bad-readings\.csv/);
    expect(lines[0]).toMatch(/line 3/);
    expect(lines[0]).toMatch(/absorbance/);
  });

  it('exits with code 2 for a manifest with a bad cell, naming row and column', () => {
    const bad = join(tmp, 'bad-manifest.csv');
    writeFileSync(bad, 'position,sample_id,role,concentration_M\nC1,B,blank,\nC2,S1,standard,lots\n');
    const r = run(['--readings', READINGS, '--manifest', bad]);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/bad-manifest\.csv row 3, column "concentration_M"/);
  });

  it('exits with code 2 for a missing file', () => {
    const r = run(['--readings', join(SAMPLES, 'nope.csv'), '--manifest', MANIFEST]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/nope\.csv: cannot be read/);
  });
});
