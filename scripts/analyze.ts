/**
 * Command-line front end of the analysis module: `npm run analyze -- --help` lists every option.
 *
 * Reads a readings file (long table by default) and a manifest CSV, runs analyzeBatch with the options
 * given and prints a summary with units, or one JSON object with --json. Numbers, units and K go
 * through the module's one number format (number-format.ts), so K reads as on the batch page and in
 * the reports. Exit codes: 0 done; 2 bad command line or unreadable input (one line on stderr naming
 * the option, or the file, row and column); 1 the analysis itself failed.
 */
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import {
  analyzeBatch,
  analyzeSpectra,
  AnalysisError,
  type AnalysisSettings,
  type BatchResult,
  type CandidateResult,
  EPSILON_UNIT,
  formatK,
  formatNumber,
  formatPercent,
  formatQuantity,
  type GlobalFitResult,
  type KStatement,
  type KStatus,
  kUnitOf,
  parseStoichiometry,
  type Reading,
  significantDigits,
  type SpectralAnalysisResult,
} from '../server/src/analysis';
import { parseInstrumentFile, parseManifestCsv, ParseError, type PlateFormat } from '../server/src/parsers';

/** Readings within this distance of --wavelength count (the analysis module's default tolerance). */
const WAVELENGTH_TOLERANCE_NM = 0.5;
const EXCLUSION_REASON = 'excluded on the command line';
const POSITION_RE = /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/;
const CONCENTRATION_UNIT = 'mol/L';

/** Every option with its value and one line of help; `--help` prints this table. */
const OPTIONS = [
  ['--readings <file>', 'instrument export to analyse (required)'],
  ['--manifest <file>', 'manifest CSV: position, sample_id, role, concentrations, volumes (required)'],
  ['--format <format>', 'readings format: long-table (default), plate-grid, spectrum or jcamp-dx'],
  ['--plate <format>', '96, 384 or cuvette (default: guessed from the manifest positions)'],
  ['--wavelength <nm>', 'wavelength to analyse, nm; required when the readings hold several'],
  ['--path-cm <cm>', 'path length, cm (default 1)'],
  [
    '--epsilon <ε>',
    `known ε of the complex, ${EPSILON_UNIT}: held in the fits, per-mixture K with no standards`,
  ],
  ['--epsilon-se <u>', `standard uncertainty of --epsilon, ${EPSILON_UNIT} (default 0)`],
  ['--candidates <list>', 'candidate stoichiometries A:B, comma-separated (default 1:1,1:2,2:1,1:3)'],
  ['--through-origin', 'calibration line through the origin (default: with intercept)'],
  ['--ceiling <A>', 'absorbance ceiling of the linear range (default 1.0)'],
  ['--exclude <list>', `positions to leave out, comma-separated, e.g. A3,B7 (reason: "${EXCLUSION_REASON}")`],
  ['--fit-baseline', 'fit a constant absorbance with K and ε (a reactant held constant absorbs too)'],
  [
    '--all-wavelengths',
    'also fit K to the whole spectrum (every wavelength read); adds "spectral" to the output',
  ],
  ['--from <nm>', 'start of the wavelength range of --all-wavelengths, nm (default: first read)'],
  ['--to <nm>', 'end of the wavelength range of --all-wavelengths, nm (default: last read)'],
  ['--mc <draws>', 'Monte Carlo uncertainty of K with this many draws (integer ≥ 10)'],
  ['--seed <n>', 'seed of the Monte Carlo draws (integer, default 1; needs --mc)'],
  ['--json', 'print one JSON object (snake_case keys) instead of the summary'],
  ['--help', 'print this help and exit'],
] as const;

export const USAGE = [
  'usage: npm run analyze -- --readings <file> --manifest <file> [options]',
  '',
  'options:',
  ...OPTIONS.map(([flag, help]) => `  ${flag.padEnd(22)}${help}`),
  '',
  'exit codes: 0 done, 2 bad command line or input file, 1 the analysis failed',
].join('\n');

class UsageError extends Error {}

/** What the command line asks for, checked. */
interface CliOptions {
  readings: string;
  manifest: string;
  format: 'long_table' | 'plate_grid' | 'spectrum' | 'jcamp_dx';
  plate: PlateFormat | null;
  wavelengthNm: number | null;
  pathLengthCm: number | undefined;
  epsilon: number | null;
  epsilonSe: number | undefined;
  candidates: string[] | undefined;
  throughOrigin: boolean;
  ceiling: number | undefined;
  exclude: string[];
  fitBaseline: boolean;
  allWavelengths: boolean;
  fromNm: number | null;
  toNm: number | null;
  mcDraws: number;
  seed: number;
  json: boolean;
}

function numberOption(name: string, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text.trim());
  if (text.trim() === '' || !Number.isFinite(v))
    throw new UsageError(`--${name} needs a number, got "${text}"`);
  return v;
}

function positiveOption(name: string, text: string | undefined, unit: string): number | undefined {
  const v = numberOption(name, text);
  if (v !== undefined && !(v > 0))
    throw new UsageError(`--${name} must be a positive number${unit ? ` (${unit})` : ''}, got "${text}"`);
  return v;
}

function integerOption(name: string, text: string | undefined): number | undefined {
  const v = numberOption(name, text);
  if (v !== undefined && !Number.isInteger(v))
    throw new UsageError(`--${name} needs an integer, got "${text}"`);
  return v;
}

/** "1:1, 1:2" → ["1:1", "1:2"]; a malformed entry names itself. */
function candidatesOption(text: string | undefined): string[] | undefined {
  if (text === undefined) return undefined;
  const items = text.split(',').map((c) => c.trim());
  if (items.every((c) => c === ''))
    throw new UsageError('--candidates needs at least one stoichiometry, e.g. 1:1,1:2');
  const labels = items.map((c) => {
    try {
      return parseStoichiometry(c).label;
    } catch {
      throw new UsageError(
        `--candidates: "${c}" is not a stoichiometry A:B with whole numbers 1 to 6 (e.g. 1:2)`,
      );
    }
  });
  return [...new Set(labels)];
}

/** "a3, B7" → ["A3", "B7"], each a well A1…P24 or a cuvette C1…; existence is checked against the manifest later. */
function excludeOption(text: string | undefined): string[] {
  if (text === undefined) return [];
  const items = text.split(',').map((p) => p.trim().toUpperCase());
  for (const p of items) {
    if (!POSITION_RE.test(p))
      throw new UsageError(`--exclude: "${p}" is not a position (a well A1…P24 or a cuvette C1, C2, …)`);
  }
  return [...new Set(items)];
}

const FORMATS = {
  'long-table': 'long_table',
  'plate-grid': 'plate_grid',
  spectrum: 'spectrum',
  'jcamp-dx': 'jcamp_dx',
} as const;

/** Reads and checks the command line; throws UsageError with one line naming the option. */
export function parseCommandLine(argv: string[]): CliOptions | 'help' {
  // "--epsilon -5" would read as a missing value; as "--epsilon=-5" it reaches the number checks below.
  const args: string[] = [];
  for (const a of argv) {
    const last = args.length - 1;
    if (/^-\d/.test(a) && last >= 0 && /^--[a-z-]+$/.test(args[last])) args[last] = `${args[last]}=${a}`;
    else args.push(a);
  }
  let values;
  try {
    ({ values } = parseArgs({
      args,
      options: {
        readings: { type: 'string' },
        manifest: { type: 'string' },
        format: { type: 'string' },
        plate: { type: 'string' },
        wavelength: { type: 'string' },
        'path-cm': { type: 'string' },
        epsilon: { type: 'string' },
        'epsilon-se': { type: 'string' },
        candidates: { type: 'string' },
        'through-origin': { type: 'boolean', default: false },
        ceiling: { type: 'string' },
        exclude: { type: 'string' },
        'fit-baseline': { type: 'boolean', default: false },
        'all-wavelengths': { type: 'boolean', default: false },
        from: { type: 'string' },
        to: { type: 'string' },
        mc: { type: 'string' },
        seed: { type: 'string' },
        json: { type: 'boolean', default: false },
        help: { type: 'boolean', short: 'h', default: false },
      },
      strict: true,
      allowPositionals: false,
    }));
  } catch (e) {
    throw new UsageError(argumentError(e as NodeJS.ErrnoException));
  }
  if (values.help) return 'help';
  if (!values.readings || !values.manifest)
    throw new UsageError('--readings <file> and --manifest <file> are required (see --help)');
  if (values.plate !== undefined && !['96', '384', 'cuvette'].includes(values.plate))
    throw new UsageError(`--plate must be 96, 384 or cuvette, got "${values.plate}"`);
  if (values.format !== undefined && !(values.format in FORMATS))
    throw new UsageError(
      `--format must be long-table, plate-grid, spectrum or jcamp-dx, got "${values.format}"`,
    );
  const fromNm = positiveOption('from', values.from, 'nm') ?? null;
  const toNm = positiveOption('to', values.to, 'nm') ?? null;
  if ((fromNm !== null || toNm !== null) && !values['all-wavelengths'])
    throw new UsageError(
      `--${fromNm !== null ? 'from' : 'to'} limits the whole-spectrum fit: it needs --all-wavelengths`,
    );
  if (fromNm !== null && toNm !== null && fromNm >= toNm)
    throw new UsageError(`--from ${values.from} nm must be below --to ${values.to} nm`);
  const epsilon = positiveOption('epsilon', values.epsilon, EPSILON_UNIT) ?? null;
  const epsilonSe = numberOption('epsilon-se', values['epsilon-se']);
  if (epsilonSe !== undefined && !(epsilonSe >= 0))
    throw new UsageError(
      `--epsilon-se must be a number ≥ 0 (${EPSILON_UNIT}), got "${values['epsilon-se']}"`,
    );
  if (epsilonSe !== undefined && epsilon === null) throw new UsageError('--epsilon-se needs --epsilon');
  const mcDraws = integerOption('mc', values.mc);
  if (mcDraws !== undefined && mcDraws < 10)
    throw new UsageError(`--mc needs an integer ≥ 10 (draws), got "${values.mc}"`);
  const seed = integerOption('seed', values.seed);
  if (seed !== undefined && mcDraws === undefined) throw new UsageError('--seed needs --mc <draws>');
  return {
    readings: values.readings,
    manifest: values.manifest,
    format: FORMATS[(values.format ?? 'long-table') as keyof typeof FORMATS],
    plate:
      values.plate === undefined
        ? null
        : values.plate === 'cuvette'
          ? 'cuvette'
          : (values.plate as PlateFormat),
    wavelengthNm: positiveOption('wavelength', values.wavelength, 'nm') ?? null,
    pathLengthCm: positiveOption('path-cm', values['path-cm'], 'cm'),
    epsilon,
    epsilonSe,
    candidates: candidatesOption(values.candidates),
    throughOrigin: values['through-origin'],
    ceiling: positiveOption('ceiling', values.ceiling, 'absorbance'),
    exclude: excludeOption(values.exclude),
    fitBaseline: values['fit-baseline'],
    allWavelengths: values['all-wavelengths'],
    fromNm,
    toNm,
    mcDraws: mcDraws ?? 0,
    seed: seed ?? 1,
    json: values.json,
  };
}

/** One line for a node:util parseArgs refusal. */
function argumentError(e: NodeJS.ErrnoException): string {
  const option = /'(-[^' ]*)/.exec(e.message)?.[1];
  switch (e.code) {
    case 'ERR_PARSE_ARGS_UNKNOWN_OPTION':
      return `unknown option ${option ?? ''} (see --help)`.replace('  ', ' ');
    case 'ERR_PARSE_ARGS_UNEXPECTED_POSITIONAL':
      return `unexpected argument ${option ?? /'([^']*)'/.exec(e.message)?.[1] ?? ''}: every value follows its option (see --help)`;
    case 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE':
      return /does not take an argument/.test(e.message)
        ? `${option ?? 'a switch'} takes no value (see --help)`
        : `${option ?? 'an option'} needs a value (see --help)`;
    default:
      return `${e.message.split('\n')[0]} (see --help)`;
  }
}

async function readInput(path: string): Promise<Buffer> {
  try {
    return await readFile(path);
  } catch (e) {
    throw new UsageError(
      `${path}: cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`,
    );
  }
}

/** Plate format from the manifest positions: all `C…` is a cuvette sequence; beyond H/12 is a 384 plate. */
function guessPlateFormat(positions: readonly string[]): PlateFormat {
  if (positions.length > 0 && positions.every((p) => /^C\d+$/i.test(p))) return 'cuvette';
  const beyond96 = positions.some((p) => {
    const m = /^([A-Za-z])(\d+)$/.exec(p);
    return m !== null && (m[1].toUpperCase() > 'H' || Number(m[2]) > 12);
  });
  return beyond96 ? '384' : '96';
}

/**
 * The wavelength to analyse. The CLI never picks one silently: a --wavelength that matches no reading,
 * or readings at several wavelengths with none chosen, is a usage error listing what the file holds.
 */
function chooseWavelength(readings: readonly Reading[], requested: number | null, file: string): number {
  const present = [...new Set(readings.map((r) => r.wavelengthNm))].sort((a, b) => a - b);
  const list = present.length ? present.map((w) => `${w}`).join(', ') + ' nm' : 'none';
  if (requested !== null) {
    if (!present.some((w) => Math.abs(w - requested) <= WAVELENGTH_TOLERANCE_NM))
      throw new UsageError(
        `--wavelength ${requested}: ${file} has no readings there; wavelengths present: ${list}`,
      );
    return requested;
  }
  if (present.length === 0) throw new UsageError(`${file}: no readings`);
  if (present.length > 1)
    throw new UsageError(
      `${file} holds readings at ${present.length} wavelengths (${list}); choose one with --wavelength`,
    );
  return present[0];
}

/** What the options ask of analyzeBatch. */
function analysisSettings(o: CliOptions, wavelengthNm: number): AnalysisSettings {
  return {
    wavelengthNm,
    pathLengthCm: o.pathLengthCm,
    epsilonLPerMolCm: o.epsilon,
    epsilonSeLPerMolCm: o.epsilonSe,
    candidates: o.candidates,
    calibrationModel: o.throughOrigin ? 'through-origin' : 'linear',
    linearRangeMaxAbsorbance: o.ceiling,
    exclusions: o.exclude.map((position) => ({ position, reason: EXCLUSION_REASON })),
    fitBaseline: o.fitBaseline,
    monteCarlo: { draws: o.mcDraws, seed: o.seed },
  };
}

/** True when the statement carries a value of K (not only a bound or a reason). */
function hasValue(status: KStatus): boolean {
  return status === 'determined' || status === 'poorly-determined';
}

function statementOf(model: string, fit: GlobalFitResult): KStatement {
  return {
    model,
    status: fit.status,
    k: fit.k,
    kCi95: fit.kCi95,
    kLowerBound95: fit.kLowerBound95,
    kUpperBound95: fit.kUpperBound95,
    message: fit.converged ? null : fit.message,
  };
}

/** K of one fit in the JSON: a number only when the fit determined one. */
function kJson(model: string, fit: GlobalFitResult | null): Record<string, unknown> {
  if (!fit) {
    return {
      K: null,
      K_ci95: null,
      K_unit: kUnitOf(model),
      K_status: 'not-determined',
      K_lower_bound_95: null,
      K_upper_bound_95: null,
      K_text: formatK({
        model,
        status: 'not-determined',
        k: null,
        kCi95: null,
        kLowerBound95: null,
        kUpperBound95: null,
        message: 'no global fit',
      }),
    };
  }
  const failed = fit.status === 'not-converged' || fit.status === 'not-determined';
  return {
    K: hasValue(fit.status) ? fit.k : null,
    K_ci95: failed ? null : (fit.kCi95 ?? [null, null]),
    K_unit: fit.kUnit || kUnitOf(model),
    K_status: fit.status,
    K_lower_bound_95: fit.status === 'lower-bound' ? fit.kLowerBound95 : null,
    K_upper_bound_95: fit.status === 'upper-bound' ? fit.kUpperBound95 : null,
    K_text: formatK(statementOf(model, fit)),
  };
}

function candidateJson(c: CandidateResult): Record<string, unknown> {
  const fit = c.fit;
  const failed = !fit || !fit.converged || fit.status === 'not-converged' || fit.status === 'not-determined';
  return {
    // The keys scripts already read.
    model: c.model,
    K_mean: c.kMean,
    K_sd: c.kSd,
    K_cv: c.kCv,
    aic: fit?.aic ?? null,
    fitK: fit && hasValue(fit.status) ? fit.k : null,
    fitK_ci95: failed ? null : (fit?.kCi95 ?? null),
    fitEpsilon: failed ? null : (fit?.epsilonLPerMolCm ?? null),
    rank: c.rank,
    ruled_out: c.ruledOut,
    reason: c.reason,
    // K as a statement with its unit.
    ...kJson(c.model, fit),
    delta_aic: c.deltaAic,
    akaike_weight: c.akaikeWeight,
    converged: fit?.converged ?? false,
    epsilon_held: fit?.epsilonFixed ?? false,
    epsilon: failed ? null : (fit?.epsilonLPerMolCm ?? null),
    baseline: failed ? null : (fit?.baseline ?? null),
    per_mixture_n: c.nFeasible,
    cross_check_epsilon_fitted: c.freeFit && {
      ...kJson(c.model, c.freeFit),
      epsilon: c.freeFit.converged ? c.freeFit.epsilonLPerMolCm : null,
    },
    warnings: c.warnings,
  };
}

/** The JSON shape of the CLI: snake_case keys as documented for scripts and reports. */
export function toCliJson(r: BatchResult): Record<string, unknown> {
  const cal = r.calibration;
  const qcWarnings = r.qc.filter((f) => f.severity !== 'info').map((f) => f.message);
  const h = r.headline;
  return {
    units: {
      wavelength: 'nm',
      path_length: 'cm',
      concentration: CONCENTRATION_UNIT,
      epsilon: EPSILON_UNIT,
      K: 'see K_unit (M^(1−a−b) for a:b)',
    },
    wavelength_nm: r.wavelengthNm,
    path_length_cm: r.pathLengthCm,
    settings: {
      candidates: r.settings.candidates,
      calibration_model: r.settings.calibrationModel,
      linear_range_max_absorbance: r.settings.linearRangeMaxAbsorbance,
      epsilon_given: r.settings.epsilonLPerMolCm,
      fit_baseline: r.settings.fitBaseline,
      exclusions: r.exclusions,
      mc_draws: r.settings.monteCarlo.draws,
      mc_seed: r.settings.monteCarlo.seed,
    },
    blank: { n: r.blank.n, mean_absorbance: r.blank.meanAbsorbance, sd: r.blank.sd },
    calibration: cal && {
      slope: cal.slope,
      intercept: cal.intercept,
      slopeSE: cal.slopeSe,
      interceptSE: cal.interceptSe,
      r2: cal.r2,
      epsilon: cal.epsilonLPerMolCm,
      lod: cal.lodM,
      loq: cal.loqM,
      n: cal.n,
    },
    epsilon_source: {
      kind: r.epsilonSource.kind,
      epsilon: r.epsilonSource.epsilonLPerMolCm,
      epsilon_se: r.epsilonSource.epsilonSe,
      note: r.epsilonSource.note,
    },
    unknowns: r.unknowns.map((u) => ({
      sample_id: u.sampleId,
      concentration_M: u.concentrationM,
      se_M: u.seM,
      flags: u.flags,
    })),
    mixtures: r.mixtures.map((m) => ({
      sample_id: m.sampleId,
      a0_M: m.a0M,
      b0_M: m.b0M,
      product_M: m.productM,
    })),
    headline: h && {
      model: h.model,
      K: hasValue(h.status) ? h.k : null,
      K_ci95:
        h.status === 'not-converged' || h.status === 'not-determined' ? null : (h.kCi95 ?? [null, null]),
      K_unit: h.kUnit,
      K_status: h.status,
      K_text: h.text,
      epsilon_held: h.epsilonFixed,
    },
    k_note: r.kNote,
    stoichiometry: (r.stoichiometry?.candidates ?? []).map(candidateJson),
    best: r.stoichiometry?.best ?? null,
    ambiguous: r.stoichiometry?.ambiguous ?? false,
    verdict: r.stoichiometry?.verdict ?? null,
    uncertainty: r.uncertainty && {
      model: r.uncertainty.model,
      K_rel_sd_propagated: r.uncertainty.propagation?.lnKSd ?? null,
      K_mc_ci95: r.uncertainty.monteCarlo?.kCi95 ?? null,
      K_mc_median: r.uncertainty.monteCarlo?.kMedian ?? null,
      mc_draws: r.uncertainty.monteCarlo?.draws ?? 0,
      mc_failed: r.uncertainty.monteCarlo?.failed ?? 0,
    },
    job: r.job && {
      max_mole_fraction_b: r.job.maxMoleFractionB,
      nearest_model: r.job.nearestModel,
      n: r.job.n,
    },
    mole_ratio: r.moleRatio && {
      varied: r.moleRatio.varied,
      fixed: r.moleRatio.fixed,
      fixed_concentration_M: r.moleRatio.fixedConcentrationM,
      break_ratio: r.moleRatio.breakRatio,
      nearest_model: r.moleRatio.nearestModel,
      n: r.moleRatio.n,
    },
    benesi_hildebrand: r.benesiHildebrand && {
      applicable: r.benesiHildebrand.applicable,
      K: r.benesiHildebrand.result?.k ?? null,
      epsilon: r.benesiHildebrand.result?.epsilonLPerMolCm ?? null,
      ratio_to_fit: r.benesiHildebrand.kRatioToGlobalFit,
    },
    qc: r.qc,
    warnings: [...r.warnings, ...qcWarnings],
  };
}

/** Wavelengths read within --from…--to (the analysis module's ½ pm grid), sorted. */
function wavelengthsInRange(readings: readonly Reading[], o: CliOptions): number[] {
  const present = [...new Set(readings.map((r) => r.wavelengthNm))].filter((w) => Number.isFinite(w));
  return present
    .filter((w) => (o.fromNm === null || w >= o.fromNm - 5e-4) && (o.toNm === null || w <= o.toNm + 5e-4))
    .sort((a, b) => a - b);
}

/**
 * Checks that --all-wavelengths has spectra to fit: at least 2 wavelengths within --from…--to. A file
 * with one wavelength, or a range that holds fewer than two, is a usage error naming what the file holds.
 */
function checkSpectra(readings: readonly Reading[], o: CliOptions, file: string): void {
  const all = [...new Set(readings.map((r) => r.wavelengthNm))].sort((a, b) => a - b);
  if (all.length < 2)
    throw new UsageError(
      `--all-wavelengths needs spectra: ${file} holds readings at ${all.length === 1 ? `one wavelength (${all[0]} nm)` : 'no wavelength'}`,
    );
  const inRange = wavelengthsInRange(readings, o);
  if (inRange.length < 2) {
    const range = `${o.fromNm ?? all[0]}–${o.toNm ?? all[all.length - 1]} nm`;
    throw new UsageError(
      `--from/--to: ${file} has ${inRange.length === 0 ? 'no wavelength' : 'only one wavelength'} within ${range}; ` +
        `it holds ${all[0]}–${all[all.length - 1]} nm (${all.length} wavelengths)`,
    );
  }
}

/**
 * The wavelength the single-wavelength analysis takes with --all-wavelengths and no --wavelength: where
 * the best whole-spectrum model's complex absorbs most beyond its reactants (max of ε_complex − Σ ε_reactant).
 */
function complexWavelength(s: SpectralAnalysisResult): number | null {
  const fit = s.candidates.find((c) => c.model === s.best);
  const complex = fit?.speciesSpectra.find((x) => x.role === 'complex');
  if (!fit || !complex) return null;
  const reactants = fit.speciesSpectra.filter((x) => x.role !== 'complex');
  let best = -1;
  let bestScore = -Infinity;
  complex.epsilon.forEach((e, j) => {
    const score = e - reactants.reduce((sum, r) => sum + Math.max(0, r.epsilon[j]), 0);
    if (score > bestScore) [best, bestScore] = [j, score];
  });
  return best < 0 ? null : s.wavelengthsNm[best];
}

function spectralStatement(c: SpectralAnalysisResult['candidates'][number]): KStatement {
  return {
    model: c.model,
    status: c.kStatus,
    k: c.k,
    kCi95: c.kCi95,
    kLowerBound95: c.kLowerBound95,
    kUpperBound95: c.kUpperBound95,
    message: c.converged ? null : c.message,
  };
}

/**
 * The `spectral` object of the JSON: species count and singular values, one entry per candidate (K with
 * its 95 % profile-likelihood interval and unit, AIC, converged), the best candidate and the range used.
 */
export function spectralJson(s: SpectralAnalysisResult, singleWavelengthNm: number): Record<string, unknown> {
  const rankOf = new Map(s.ranking.ranked.map((r) => [r.model, r]));
  return {
    species_count: s.speciesCount,
    singular_values: s.singularValues,
    noise_level: s.noiseLevel,
    noise_sd: s.noiseSd,
    species_count_method: s.speciesCountMethod,
    wavelength_range_nm: [s.wavelengthsNm[0], s.wavelengthsNm[s.wavelengthsNm.length - 1]],
    n_wavelengths: s.wavelengthsNm.length,
    n_mixtures: s.mixtures.length,
    candidates: s.candidates.map((c) => {
      const failed = c.kStatus === 'not-converged' || c.kStatus === 'not-determined';
      const r = rankOf.get(c.model);
      return {
        model: c.model,
        K: hasValue(c.kStatus) ? c.k : null,
        K_ci95: failed ? null : (c.kCi95 ?? [null, null]),
        K_unit: c.kUnit || kUnitOf(c.model),
        K_status: c.kStatus,
        K_text: formatK(spectralStatement(c)),
        aic: c.aic,
        delta_aic: r?.deltaAic ?? null,
        rank: r?.rank ?? null,
        ruled_out: r?.ruledOut ?? false,
        residual_sd: c.residualSd,
        converged: c.converged,
        warnings: c.warnings,
      };
    }),
    best: s.best,
    ambiguous: s.ranking.ambiguous,
    verdict: s.ranking.verdict,
    single_wavelength_nm: singleWavelengthNm,
    warnings: s.warnings,
  };
}

function spectralSummary(s: SpectralAnalysisResult): string {
  const w = s.wavelengthsNm;
  const out = [
    `Whole spectrum (${w.length} wavelengths, ${w[0]}–${w[w.length - 1]} nm; ${s.mixtures.length} mixtures): ` +
      `${s.speciesCount} absorbing species from the singular values`,
  ];
  const rankOf = new Map(s.ranking.ranked.map((r) => [r.model, r]));
  for (const c of [...s.candidates].sort(
    (a, b) => (rankOf.get(a.model)?.rank ?? 99) - (rankOf.get(b.model)?.rank ?? 99),
  )) {
    const d = rankOf.get(c.model)?.deltaAic;
    const k = formatK(spectralStatement(c));
    out.push(
      `  ${c.model}: ${c.kStatus === 'determined' ? `K = ${k}` : `K ${k}`}; ΔAIC ${d == null ? '—' : d.toFixed(1)}`,
    );
  }
  out.push(`Whole-spectrum verdict: ${s.ranking.verdict}`);
  for (const warning of s.warnings) out.push(`Whole-spectrum note: ${warning}`);
  return out.join('\n');
}

/** A value ± its uncertainty in one unit, digits following the uncertainty. */
function withUncertainty(value: number | null, se: number | null, unit: string): string {
  if (value === null) return '—';
  const d = significantDigits(value, se);
  const u = se === null ? '' : ` ± ${formatNumber(se, 2)}`;
  return `${formatNumber(value, d)}${u} ${unit}`;
}

function candidateLines(c: CandidateResult): string[] {
  const fit = c.fit;
  const unit = c.kUnit || kUnitOf(c.model);
  const k = fit ? formatK(statementOf(c.model, fit)) : 'no global fit';
  const parts = [fit && fit.status === 'determined' ? `K = ${k}` : `K ${k}`];
  const converged = fit !== null && fit.converged;
  parts.push(`ΔAIC ${converged && c.deltaAic !== null ? c.deltaAic.toFixed(1) : '—'}`);
  if (converged && fit.epsilonLPerMolCm !== null)
    parts.push(
      `ε ${formatQuantity(fit.epsilonLPerMolCm, EPSILON_UNIT, 4)} (${fit.epsilonFixed ? 'held' : 'fitted'})`,
    );
  if (converged && fit.baseline !== null)
    parts.push(`baseline ${formatNumber(fit.baseline, 3)} ± ${formatNumber(fit.baselineSe, 2)} (absorbance)`);
  if (c.kMean !== null)
    parts.push(
      `per-mixture K ${formatQuantity(c.kMean, unit)} (CV ${formatPercent(c.kCv)}, ${c.nFeasible} mixtures)`,
    );
  const lines = [`  ${c.rank}. ${c.model}: ${parts.join('; ')}`];
  if (c.ruledOut) lines.push(`       ruled out: ${c.reason}`);
  for (const w of c.warnings) lines.push(`       note: ${w}`);
  return lines;
}

function summary(r: BatchResult): string {
  const out: string[] = [];
  out.push(
    `Wavelength ${r.wavelengthNm ?? '—'} nm; path length ${r.pathLengthCm} cm; ` +
      `blank absorbance ${formatNumber(r.blank.meanAbsorbance, 3)} (n = ${r.blank.n})`,
  );
  const c = r.calibration;
  if (c) {
    const sign = c.intercept >= 0 ? '+' : '−';
    out.push(
      `Calibration (${c.model === 'through-origin' ? 'through the origin' : 'with intercept'}, n = ${c.n}): ` +
        `A = ${formatQuantity(c.slope, 'L·mol⁻¹', 5)} × c ${sign} ${formatNumber(Math.abs(c.intercept), 3)}; ` +
        `R² = ${c.r2.toFixed(5)}`,
    );
    out.push(
      `  ε = ${withUncertainty(c.epsilonLPerMolCm, c.epsilonSe, EPSILON_UNIT)}; ` +
        `LOD ${formatQuantity(c.lodM, CONCENTRATION_UNIT)}, LOQ ${formatQuantity(c.loqM, CONCENTRATION_UNIT)}`,
    );
  } else out.push('Calibration: none');
  for (const [label, list] of [
    ['Unknowns', r.unknowns],
    ['Controls', r.controls],
  ] as const) {
    if (list.length === 0) continue;
    out.push(`${label} (in the original sample, after the dilution factor):`);
    for (const u of list) {
      out.push(
        `  ${u.sampleId}: ${withUncertainty(u.concentrationM, u.seM, CONCENTRATION_UNIT)} (dilution ×${u.dilutionFactor}` +
          `${u.flags.length ? `; ${u.flags.join(', ')}` : ''})`,
      );
    }
  }
  if (r.mixtures.length) {
    out.push(`Mixtures: ${r.mixtures.length}`);
    const e = r.epsilonSource;
    out.push(
      `ε of the complex: ${e.epsilonLPerMolCm === null ? 'none' : withUncertainty(e.epsilonLPerMolCm, e.epsilonSe, EPSILON_UNIT)} — ${e.note}`,
    );
  }
  const candidates = r.stoichiometry?.candidates ?? [];
  if (candidates.length) {
    out.push('Candidate stoichiometries (A:B), best first:');
    for (const s of candidates) out.push(...candidateLines(s));
  }
  if (r.stoichiometry) out.push(`Verdict: ${r.stoichiometry.verdict}`);
  if (r.headline) out.push(`K (${r.headline.model}): ${r.headline.text}`);
  if (r.mixtures.length) out.push(`Note: ${r.kNote}`);
  const u = r.uncertainty;
  if (u?.propagation)
    out.push(
      `Uncertainty of K (${u.model}): ±${formatPercent(u.propagation.lnKSd)} (first order, from pipetting and absorbance)`,
    );
  if (u?.monteCarlo) {
    const mc = u.monteCarlo;
    const unit = kUnitOf(u.model);
    out.push(
      `  Monte Carlo (${mc.draws} draws, seed ${mc.seed}): median ${formatQuantity(mc.kMedian, unit)}, ` +
        `95 % ${formatNumber(mc.kCi95[0])} to ${formatNumber(mc.kCi95[1])} ${unit}` +
        (mc.failed ? ` (${mc.failed} refits did not converge)` : ''),
    );
  }
  if (r.job?.maxMoleFractionB != null)
    out.push(
      `Job's plot (${r.job.n} mixtures): maximum at x_B = ${r.job.maxMoleFractionB.toFixed(3)} (nearest ${r.job.nearestModel ?? '—'})`,
    );
  const mr = r.moleRatio;
  if (mr) {
    const ratio = mr.varied === 'B' ? 'B:A' : 'A:B';
    out.push(
      `Mole-ratio series (${mr.n} mixtures, ${mr.fixed} held at ${formatQuantity(mr.fixedConcentrationM, CONCENTRATION_UNIT)}): ` +
        (mr.breakRatio === null
          ? `no break found (${mr.message})`
          : `break at ${ratio} = ${formatNumber(mr.breakRatio, 3)} (nearest ${mr.nearestModel ?? '—'})`),
    );
  }
  const bh = r.benesiHildebrand;
  if (bh?.result?.k != null)
    out.push(
      `Benesi–Hildebrand (1:1): K = ${formatQuantity(bh.result.k, kUnitOf('1:1'))}` +
        (bh.kRatioToGlobalFit === null
          ? ''
          : ` (×${formatNumber(bh.kRatioToGlobalFit, 3)} of the global fit)`),
    );
  for (const f of r.qc) out.push(`QC ${f.severity}: ${f.message}`);
  // The best candidate's notes are already printed under it.
  const shown = new Set(candidates[0]?.warnings ?? []);
  for (const w of r.warnings) if (!shown.has(w)) out.push(`Warning: ${w}`);
  return out.join('\n');
}

async function main(argv: string[]): Promise<number> {
  const o = parseCommandLine(argv);
  if (o === 'help') {
    process.stdout.write(USAGE + '\n');
    return 0;
  }
  const manifestName = basename(o.manifest);
  const manifest = await parseManifestCsv(await readInput(o.manifest), manifestName);
  if (manifest.problems.length > 0) {
    const p = manifest.problems[0];
    const more = manifest.problems.length > 1 ? ` (and ${manifest.problems.length - 1} more problems)` : '';
    throw new UsageError(`${manifestName} row ${p.row}, column "${p.column}": ${p.message}${more}`);
  }
  const positions = manifest.samples.map((s) => s.position.toUpperCase());
  const unknownPositions = o.exclude.filter((p) => !positions.includes(p));
  if (unknownPositions.length)
    throw new UsageError(`--exclude: ${unknownPositions.join(', ')} not in ${manifestName}`);
  const plateFormat = o.plate ?? guessPlateFormat(positions);
  const readingsName = basename(o.readings);
  const run = await parseInstrumentFile(await readInput(o.readings), readingsName, {
    format: o.format,
    plateFormat,
  });
  if (!o.allWavelengths) {
    const wavelengthNm = chooseWavelength(run.readings, o.wavelengthNm, readingsName);
    const result = analyzeBatch(run.readings, manifest.samples, analysisSettings(o, wavelengthNm));
    process.stdout.write((o.json ? JSON.stringify(toCliJson(result), null, 2) : summary(result)) + '\n');
    return 0;
  }
  checkSpectra(run.readings, o, readingsName);
  const spectral = analyzeSpectra(run.readings, manifest.samples, {
    fromNm: o.fromNm,
    toNm: o.toNm,
    pathLengthCm: o.pathLengthCm,
    candidates: o.candidates,
    exclusions: o.exclude.map((position) => ({ position, reason: EXCLUSION_REASON })),
    fitBaseline: o.fitBaseline,
  });
  // The single-wavelength analysis runs beside it: at --wavelength, or where the complex stands out.
  const wavelengthNm =
    o.wavelengthNm !== null
      ? chooseWavelength(run.readings, o.wavelengthNm, readingsName)
      : (complexWavelength(spectral) ?? spectral.wavelengthsNm[0]);
  const result = analyzeBatch(run.readings, manifest.samples, analysisSettings(o, wavelengthNm));
  if (o.wavelengthNm === null)
    result.warnings.push(
      `single-wavelength analysis at ${wavelengthNm} nm, where the whole-spectrum fit's complex absorbs most ` +
        `beyond its reactants (choose another with --wavelength)`,
    );
  process.stdout.write(
    (o.json
      ? JSON.stringify({ ...toCliJson(result), spectral: spectralJson(spectral, wavelengthNm) }, null, 2)
      : `${summary(result)}\n${spectralSummary(spectral)}`) + '\n',
  );
  return 0;
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    if (e instanceof ParseError || e instanceof UsageError) {
      process.stderr.write(`analyze: ${e.message}\n`);
      process.exitCode = 2;
    } else if (e instanceof AnalysisError) {
      process.stderr.write(`analyze: ${e.message}\n`);
      process.exitCode = 1;
    } else {
      process.stderr.write(`analyze: unexpected error: ${(e as Error).stack ?? String(e)}\n`);
      process.exitCode = 1;
    }
  },
);
