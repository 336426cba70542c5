import { AnalysisError } from './errors';
import { EquilibriumState, equilibriumSensitivity, solveEquilibrium } from './equilibrium-solve';
import { kFromProfile, kStatusNote } from './k-profile-verdict';
import { invertSpd } from './linear-algebra';
import { levenbergMarquardt } from './levenberg-marquardt';
import { KStatus, kUnit } from './number-format';
import { projectSpectra, SpectralProjection } from './spectral-projection';
import { spectralRowBasis } from './spectral-row-basis';
import { Stoichiometry } from './stoichiometry-model';

/** One mixture of a whole-spectrum fit: its initial concentrations and the path its spectrum is scaled to. */
export interface SpectralMixture {
  /** Initial A and B after mixing, mol/L. */
  a0M: number;
  b0M: number;
  pathLengthCm: number;
}

/**
 * Whether a reactant absorbs: its free spectrum fitted with the others (default), not absorbing at all, or
 * held at a known spectrum ε(λ) (L·mol⁻¹·cm⁻¹ at each wavelength of the matrix), e.g. from the mixtures
 * that hold only that reactant.
 */
export type ReactantSpectrum = 'fitted' | 'none' | { epsilon: readonly number[] };

export interface SpectralFitOptions {
  /** Reactant A's spectrum. Default 'fitted'. */
  reactantA?: ReactantSpectrum;
  /** Reactant B's spectrum. Default 'fitted'. */
  reactantB?: ReactantSpectrum;
  /** Constrain every fitted ε(λ) ≥ 0 (non-negative least squares). Default false. */
  nonNegativeSpectra?: boolean;
  /**
   * Also fit an absorbance offset at each wavelength, common to all mixtures (it takes up an error of the
   * blank, which every mixture shares). Default false. Not with non-negative spectra.
   */
  fitBaseline?: boolean;
  /** Start the optimiser here (M^(1−a−b)) instead of at the best point of a grid over K. */
  startK?: number;
  /** Levenberg–Marquardt limits. Defaults 200 and 1e-11. */
  maxIterations?: number;
  parameterTolerance?: number;
  /** Equilibrium root-finder limits. Defaults 1e-14 and 100. */
  solverTolerance?: number;
  solverMaxIterations?: number;
  /** Iteration limit of the non-negative solver per evaluation. Default 100 × species. */
  nnlsMaxIterations?: number;
  /** Compute the profile-likelihood interval of K. Default true. */
  profile?: boolean;
  /**
   * An orthonormal basis of the rows of the absorbance matrix and the held spectra ({@link spectralRowBasis}),
   * when the caller fits several candidates to one matrix; computed here when omitted. Checked.
   */
  rowBasis?: readonly (readonly number[])[];
}

export type SpeciesRole = 'reactant-a' | 'reactant-b' | 'complex';

/** One species' spectrum as the fit found (or held) it. */
export interface SpeciesSpectrum {
  /** "A", "B", or the complex, e.g. "AB₂". */
  species: string;
  role: SpeciesRole;
  source: 'fitted' | 'held';
  /** Molar absorption coefficient at each wavelength, L·mol⁻¹·cm⁻¹. */
  epsilon: number[];
  /** Its standard error; null where held, at a non-negativity bound, or not separately determined. */
  se: (number | null)[];
}

/** Equilibrium concentration of one species in every mixture at the estimated K. */
export interface SpeciesConcentrations {
  species: string;
  role: SpeciesRole;
  concentrationM: number[];
}

/** Whole-spectrum fit of one candidate stoichiometry. */
export interface SpectralFitResult {
  model: string;
  mixtures: number;
  wavelengths: number;
  /** Observations n = mixtures × wavelengths, parameters p = 1 + (fitted species × wavelengths), ν = n − p. */
  n: number;
  p: number;
  df: number;
  kStatus: KStatus;
  kUnit: string;
  /** Formation constant, M^(1−a−b); null unless determined (or poorly determined). */
  k: number | null;
  /** Linearised SE of K (K·SE(ln K)); null unless determined, and for non-negative spectra. */
  kSe: number | null;
  /** 95 % profile-likelihood interval of K (from log₁₀ K); an end is null when the data do not bound it. */
  kCi95: [number | null, number | null] | null;
  kLowerBound95: number | null;
  kUpperBound95: number | null;
  log10K: number | null;
  log10KSe: number | null;
  /** Residual sum of squares over all mixtures and wavelengths (absorbance²) and the residual SD. */
  rss: number | null;
  residualSd: number | null;
  /** AIC = n·ln(RSS/n) + 2p and AICc = AIC + 2p(p+1)/(n − p − 1). */
  aic: number | null;
  aicc: number | null;
  /** The absorbing species: A and B (when they absorb) and the complex. */
  speciesSpectra: SpeciesSpectrum[];
  /** The fitted absorbance offset at each wavelength and its SE, when asked for; else null. */
  baseline: { absorbance: number[]; se: (number | null)[] } | null;
  /** Free A, free B and the complex in every mixture at the estimate, mol/L. */
  speciesConcentrations: SpeciesConcentrations[];
  /** Measured − fitted absorbance, mixtures × wavelengths. */
  residuals: number[][];
  /** Numerical rank of the fitted species' concentration matrix at the estimate. */
  rank: number;
  converged: boolean;
  iterations: number;
  message: string;
  warnings: string[];
}

const LN10 = Math.log(10);
/** The searched range of the dimensionless K·C^(a+b−1), as log₁₀ (the single-wavelength fit's range). */
const LOG10_U_RANGE: [number, number] = [-4, 8];
const SUBSCRIPT = '₀₁₂₃₄₅₆₇₈₉';

/**
 * The complex of a candidate as a formula: A_aB_b with subscripts, 1 left out.
 *
 * @example
 * complexSpeciesLabel({ a: 1, b: 2, label: '1:2' }); // "AB₂"
 */
export function complexSpeciesLabel(model: Stoichiometry): string {
  const sub = (n: number): string =>
    n === 1 ? '' : [...String(n)].map((d) => SUBSCRIPT[Number(d)]).join('');
  return `A${sub(model.a)}B${sub(model.b)}`;
}

interface Column {
  role: SpeciesRole | 'baseline';
  species: string;
  held: readonly number[] | null;
}

interface Evaluation {
  states: EquilibriumState[];
  /** Fitted species' concentration × path, mixtures × fitted species. */
  c: number[][];
  /** Absorbance less the held species' share, mixtures × wavelengths. */
  y: number[][];
  proj: SpectralProjection;
}

/** Evaluates the projection at one ln K, warm-starting the equilibrium from the last one; caches the last. */
class SpectralEvaluator {
  private lastLnK = NaN;
  private last: Evaluation | null = null;
  equilibriumOk = true;

  constructor(
    private readonly mixtures: readonly SpectralMixture[],
    /** Absorbance (or its exact reduction), mixtures × columns. */
    readonly absorbance: readonly (readonly number[])[],
    /** The held species' spectra over the same columns. */
    private readonly heldSpectra: readonly (readonly number[])[],
    private readonly model: Stoichiometry,
    private readonly fitted: readonly Column[],
    private readonly held: readonly Column[],
    private readonly options: SpectralFitOptions,
  ) {}

  at(lnK: number): Evaluation {
    if (lnK === this.lastLnK && this.last) return this.last;
    const k = Math.exp(lnK);
    const previous = this.last?.states ?? [];
    const states = this.mixtures.map((mx, i) => {
      const st = solveEquilibrium(k, mx.a0M, mx.b0M, this.model, {
        tolerance: this.options.solverTolerance,
        maxIterations: this.options.solverMaxIterations,
        initialGuessM: previous[i]?.productM,
      });
      if (!st.converged) this.equilibriumOk = false;
      return st;
    });
    const c = states.map((st, i) =>
      this.fitted.map((col) =>
        col.role === 'baseline' ? 1 : this.mixtures[i].pathLengthCm * concentrationOf(col, st),
      ),
    );
    let y = this.absorbance as number[][];
    if (this.held.length > 0) {
      y = this.absorbance.map((row, i) => {
        const out = row.slice();
        for (let h = 0; h < this.held.length; h++) {
          const lc = this.mixtures[i].pathLengthCm * concentrationOf(this.held[h], states[i]);
          const eps = this.heldSpectra[h];
          for (let j = 0; j < out.length; j++) out[j] -= lc * eps[j];
        }
        return out;
      });
    }
    const proj = projectSpectra(c, y, {
      nonNegative: this.options.nonNegativeSpectra ?? false,
      maxIterations: this.options.nnlsMaxIterations,
    });
    this.last = { states, c, y, proj };
    this.lastLnK = lnK;
    return this.last;
  }

  /**
   * ∂(Y − R)/∂ln K by Kaufman's approximation, (I − C·C⁺)·u with u = ∂(C·E)/∂ln K at fixed E (held species
   * included), one row per observation. It drops a term that lies in the range of C, which is orthogonal to R,
   * so the gradient Jᵀ·R, and with it the optimum, are exact.
   */
  jacobian(lnK: number): number[][] {
    const ev = this.at(lnK);
    const cols = this.absorbance[0].length;
    const u = ev.states.map((st, i) => {
      const row = new Array<number>(cols).fill(0);
      const add = (col: Column, eps: readonly number[]): void => {
        const d = this.mixtures[i].pathLengthCm * dConcentrationDLnK(col, st, this.model);
        if (d !== 0) for (let j = 0; j < cols; j++) row[j] += d * eps[j];
      };
      this.fitted.forEach((col, k) => add(col, ev.proj.spectra[k]));
      this.held.forEach((col, h) => add(col, this.heldSpectra[h]));
      return row;
    });
    const projected = projectSpectra(ev.c, u).residuals;
    const out: number[][] = [];
    for (const row of projected) for (const v of row) out.push([v]);
    return out;
  }
}

function concentrationOf(col: Pick<Column, 'role'>, st: EquilibriumState): number {
  return col.role === 'reactant-a' ? st.aFreeM : col.role === 'reactant-b' ? st.bFreeM : st.productM;
}

function dConcentrationDLnK(col: Pick<Column, 'role'>, st: EquilibriumState, model: Stoichiometry): number {
  if (col.role === 'baseline') return 0;
  const dx = equilibriumSensitivity(st, model).dProductDLnK;
  return col.role === 'reactant-a' ? -model.a * dx : col.role === 'reactant-b' ? -model.b * dx : dx;
}

/** A given basis must span every row: ‖x − Q·Qᵀx‖ = ‖x‖² − ‖Qᵀx‖² ≈ 0 for each, Qᵀx already computed. */
function checkBasis(
  basis: readonly (readonly number[])[],
  w: number,
  rows: readonly (readonly number[])[],
  reduced: readonly (readonly number[])[],
): void {
  if (basis.some((q) => q.length !== w))
    throw new AnalysisError('invalid-input', 'the row basis needs one value per wavelength');
  rows.forEach((row, i) => {
    const full = row.reduce((sum, v) => sum + v * v, 0);
    const kept = reduced[i].reduce((sum, v) => sum + v * v, 0);
    if (Math.abs(full - kept) > 1e-9 * Math.max(full, 1e-300))
      throw new AnalysisError('invalid-input', 'the row basis does not span the absorbance spectra');
  });
}

function checkReactant(name: string, r: ReactantSpectrum, w: number): readonly number[] | null {
  if (r === 'fitted' || r === 'none') return null;
  if (r.epsilon.length !== w || !r.epsilon.every(Number.isFinite))
    throw new AnalysisError(
      'invalid-settings',
      `the held spectrum of ${name} needs a finite ε at each of the ${w} wavelengths`,
    );
  return r.epsilon;
}

/**
 * Whole-spectrum (global multi-wavelength) fit of one candidate aA + bB ⇌ AₐB_b: Beer–Lambert for a
 * mixture of absorbers, Y = C(K)·E with Y the absorbances (mixtures × wavelengths, blank-corrected), C the
 * equilibrium concentrations × path of the absorbing species (free A, free B, complex; which of them absorb
 * is part of the model) and E their spectra. For a trial K the equilibrium gives C, and E follows by linear
 * least squares (variable projection: E = C⁺·Y, or non-negative least squares); ln K is optimised on the
 * projected residual S(K) = ‖Y − C·C⁺·Y‖². The search: a grid over the dimensionless K·C^(a+b−1) from 10⁻³
 * to 10⁷, then Levenberg–Marquardt on ln K (Kaufman's Jacobian of the projected residual; central
 * differences for non-negative spectra). The search runs on the exact reduction of the spectra onto the row
 * space of Y ({@link spectralRowBasis}: the same S at every K), the final fit on Y itself. A reactant whose
 * spectrum is held is subtracted first: Y − l·[X]·ε_Xᵀ. With `fitBaseline` a column of ones joins C: an
 * absorbance offset at each wavelength shared by every mixture, which takes up the error of the mean blank
 * (subtracted from every mixture alike, so not independent between mixtures).
 *
 * What is known of K comes from the profile of S over θ = log₁₀ K (exactly the variable-projection S,
 * which re-optimises every ε at each K) by the rules of the single-wavelength global fit, with
 * ν = m·w − p, p = 1 + (fitted species × w). AIC = n·ln(S/n) + 2p over all n = m·w residuals. Standard
 * errors (unconstrained spectra): the linearised covariance of the full problem (ln K and every ε) at the
 * estimate, s² = S/ν, which for ε at wavelength j is s²·[(CᵀC)⁻¹ + g_j·g_jᵀ/S_θ] with u_j = ∂(C·e_j)/∂ln K,
 * g_j = C⁺·u_j and S_θ = Σ_j ‖(I − C·C⁺)·u_j‖² (the Schur complement for ln K, so SE(ln K) = s/√S_θ).
 * With non-negative spectra the SEs are s²·(C_PᵀC_P)⁻¹ over the species not at their bound, given K. These
 * assume independent absorbance noise of one SD at every reading; errors shared by all wavelengths of a
 * mixture (pipetting) are not in them.
 *
 * Units: concentrations mol/L, path cm, absorbance dimensionless, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: Golub G.H. & Pereyra V. (2003) Inverse Problems 19, R1 (variable projection); Kaufman L. (1975)
 * BIT 15, 49; Maeder M. & Neuhold Y.-M., Practical Data Analysis in Chemistry (Elsevier, 2007)
 * (model-based global analysis of spectra of equilibria); Bates D.M. & Watts D.G., Nonlinear Regression
 * Analysis and Its Applications (Wiley, 1988), §6.1; Akaike H. (1974) IEEE Trans. Autom. Control 19, 716.
 *
 * @param mixtures initial concentrations and path length of each mixture (rows of the matrix)
 * @param absorbance blank-corrected absorbance, mixtures × wavelengths
 * @param model candidate stoichiometry
 * @throws AnalysisError 'invalid-input' for a ragged or non-finite matrix, or impossible concentrations;
 *   'invalid-settings' for a held spectrum of the wrong length
 * @example
 * const m = { a: 1, b: 1, label: '1:1' };
 * const mixtures = [1, 2, 4, 8, 16].map((r) => ({ a0M: 1e-4, b0M: r * 1e-4, pathLengthCm: 1 }));
 * const y = mixtures.map((x) => { const s = solveEquilibrium(500, x.a0M, x.b0M, m);
 *   return [2000 * s.productM + 100 * s.bFreeM, 5000 * s.productM]; });
 * fitSpectralModel(mixtures, y, m, { reactantA: 'none' }).k; // 500
 */
export function fitSpectralModel(
  mixtures: readonly SpectralMixture[],
  absorbance: readonly (readonly number[])[],
  model: Stoichiometry,
  options: SpectralFitOptions = {},
): SpectralFitResult {
  const m = mixtures.length;
  if (m === 0 || absorbance.length !== m)
    throw new AnalysisError('invalid-input', 'the absorbance matrix needs one row per mixture');
  const w = absorbance[0].length;
  if (w === 0) throw new AnalysisError('invalid-input', 'the absorbance matrix has no wavelengths');
  for (const row of absorbance) {
    if (row.length !== w || !row.every(Number.isFinite))
      throw new AnalysisError('invalid-input', 'every mixture needs a finite absorbance at every wavelength');
  }
  for (const mx of mixtures) {
    if (
      ![mx.a0M, mx.b0M, mx.pathLengthCm].every(Number.isFinite) ||
      mx.a0M < 0 ||
      mx.b0M < 0 ||
      !(mx.pathLengthCm > 0)
    )
      throw new AnalysisError('invalid-input', 'every mixture needs A₀, B₀ ≥ 0 and a positive path length');
  }
  const columns: Column[] = [];
  const roleA = options.reactantA ?? 'fitted';
  const roleB = options.reactantB ?? 'fitted';
  if (roleA !== 'none')
    columns.push({ role: 'reactant-a', species: 'A', held: checkReactant('A', roleA, w) });
  if (roleB !== 'none')
    columns.push({ role: 'reactant-b', species: 'B', held: checkReactant('B', roleB, w) });
  columns.push({ role: 'complex', species: complexSpeciesLabel(model), held: null });
  const nonNegative = options.nonNegativeSpectra ?? false;
  if (options.fitBaseline) {
    if (nonNegative)
      throw new AnalysisError(
        'invalid-settings',
        'a fitted baseline can be negative: not with non-negative spectra',
      );
    columns.push({ role: 'baseline', species: 'baseline', held: null });
  }
  const fitted = columns.filter((c) => c.held === null);
  const held = columns.filter((c) => c.held !== null);
  const n = m * w;
  const p = 1 + fitted.length * w;
  const df = n - p;
  const unit = kUnit(model.a, model.b);
  const allSpecies: { role: SpeciesRole; species: string }[] = [
    { role: 'reactant-a', species: 'A' },
    { role: 'reactant-b', species: 'B' },
    { role: 'complex', species: complexSpeciesLabel(model) },
  ];
  const empty = (message: string): SpectralFitResult => ({
    model: model.label,
    mixtures: m,
    wavelengths: w,
    n,
    p,
    df,
    kStatus: 'not-determined',
    kUnit: unit,
    k: null,
    kSe: null,
    kCi95: null,
    kLowerBound95: null,
    kUpperBound95: null,
    log10K: null,
    log10KSe: null,
    rss: null,
    residualSd: null,
    aic: null,
    aicc: null,
    speciesSpectra: [],
    baseline: null,
    speciesConcentrations: [],
    residuals: [],
    rank: 0,
    converged: false,
    iterations: 0,
    message,
    warnings: [`${model.label}: ${message}`],
  });
  if (df < 1)
    return empty(`a fit of ${fitted.length} spectra needs more than ${fitted.length} mixtures, got ${m}`);

  // ln K ↔ log₁₀ of the dimensionless K·C^(a+b−1), C a typical concentration of the mixtures.
  const scale = mixtures.map((mx) => Math.max(mx.a0M, mx.b0M)).sort((u, v) => u - v)[Math.floor(m / 2)];
  if (!(scale > 0)) throw new AnalysisError('invalid-input', 'the mixtures hold no reactant');
  const order = model.a + model.b - 1;
  const lnKOf = (log10u: number): number => log10u * LN10 - order * Math.log(scale);
  const lnKRange: [number, number] = [lnKOf(LOG10_U_RANGE[0]), lnKOf(LOG10_U_RANGE[1])];
  const heldSpectra = held.map((col) => col.held as readonly number[]);
  const fullEvaluator = (): SpectralEvaluator =>
    new SpectralEvaluator(mixtures, absorbance, heldSpectra, model, fitted, held, options);
  // The search runs on the exact reduction Y·Q (Q an orthonormal basis of the rows of Y and the held spectra):
  // the same S(K) at every K for a fraction of the work. Not for non-negative spectra (ε ≥ 0 is a
  // constraint over the wavelengths themselves).
  let evaluator = fullEvaluator;
  if (!nonNegative && w > m + held.length) {
    const basis = options.rowBasis ?? spectralRowBasis(absorbance, heldSpectra);
    const reduce = (rows: readonly (readonly number[])[]): number[][] =>
      rows.map((row) => basis.map((q) => row.reduce((sum, v, j) => sum + v * q[j], 0)));
    const reducedY = reduce(absorbance);
    const reducedHeld = reduce(heldSpectra);
    checkBasis(basis, w, [...absorbance, ...heldSpectra], [...reducedY, ...reducedHeld]);
    evaluator = () => new SpectralEvaluator(mixtures, reducedY, reducedHeld, model, fitted, held, options);
  }

  // Start: the best point of a grid over the dimensionless K.
  let lnK0: number;
  if (options.startK !== undefined) {
    if (!(options.startK > 0)) throw new AnalysisError('invalid-settings', 'a starting K must be positive');
    lnK0 = Math.log(options.startK);
  } else {
    const grid = evaluator();
    let best = { rss: Infinity, lnK: NaN };
    const steps = 30;
    for (let s = 0; s <= steps; s++) {
      const lnK = lnKOf(-3 + (10 * s) / steps);
      const rss = grid.at(lnK).proj.rss;
      if (rss < best.rss) best = { rss, lnK };
    }
    if (!Number.isFinite(best.rss)) return empty('no K gives a finite fit to these spectra');
    lnK0 = best.lnK;
  }

  // Levenberg–Marquardt on ln K alone: the observations are the absorbances, the prediction at ln K is the
  // projected fit Y − R(K), so the residual it minimises is the projected residual R(K); Kaufman's Jacobian.
  const lmEvaluator = evaluator();
  // Any fixed observations work: the prediction is defined as observations − R(K).
  const y0 = lmEvaluator.absorbance;
  const cols = y0[0].length;
  const observations = new Array<number>(m * cols);
  for (let i = 0; i < m; i++) for (let j = 0; j < cols; j++) observations[i * cols + j] = y0[i][j];
  const lm = levenbergMarquardt(
    {
      evaluate: (q) => {
        const r = lmEvaluator.at(q[0]).proj.residuals;
        const f = new Array<number>(m * cols);
        for (let i = 0; i < m; i++) {
          const ri = r[i];
          for (let j = 0; j < cols; j++) f[i * cols + j] = observations[i * cols + j] - ri[j];
        }
        return f;
      },
      // Non-negative spectra: E is piecewise in K, so central differences (the optimiser's default).
      jacobian: nonNegative ? undefined : (q) => lmEvaluator.jacobian(q[0]),
    },
    observations,
    [lnK0],
    { maxIterations: options.maxIterations ?? 200, parameterTolerance: options.parameterTolerance ?? 1e-11 },
  );
  const profileEvaluator = evaluator();
  const verdict = kFromProfile({
    profileRss: (lnK) => profileEvaluator.at(lnK).proj.rss,
    lnK: lm.params[0],
    rss: lm.rss,
    converged: lm.converged,
    message: lm.message,
    solverOk: lmEvaluator.equilibriumOk,
    lnKRange,
    df,
    profile: options.profile,
  });
  let status = verdict.status;
  let message = verdict.message;
  const warnings: string[] = [];

  // The fit at the estimate (for a bound: at the edge of the searched range).
  const fin = fullEvaluator().at(verdict.lnKHat);
  if (nonNegative && !fin.proj.converged) {
    status = 'not-converged';
    message = 'the non-negative least-squares solver ran out of iterations';
  }
  const hasValue = status === 'determined' || status === 'poorly-determined';
  const rssMin = verdict.rssMin;
  const s2 = rssMin / df;

  // Standard errors of the spectra (and of ln K), see the doc comment.
  const fittedSe: (number | null)[][] = fitted.map(() => new Array<number | null>(w).fill(null));
  let lnKSe: number | null = null;
  const f = fitted.length;
  const inv = fin.proj.inverseGram;
  if (!nonNegative && inv) {
    const dC = fin.states.map((st, i) =>
      columns.map((col) => mixtures[i].pathLengthCm * dConcentrationDLnK(col, st, model)),
    );
    const eps = columns.map((col) => (col.held ? col.held : fin.proj.spectra[fitted.indexOf(col)]));
    const g: number[][] = [];
    let sTheta = 0;
    for (let j = 0; j < w; j++) {
      const uj = dC.map((row) => row.reduce((sum, d, k) => sum + d * eps[k][j], 0));
      const ctu = new Array<number>(f).fill(0);
      for (let i = 0; i < m; i++) for (let k = 0; k < f; k++) ctu[k] += fin.c[i][k] * uj[i];
      const gj = inv.map((row) => row.reduce((sum, v, k) => sum + v * ctu[k], 0));
      for (let i = 0; i < m; i++) {
        let pu = uj[i];
        for (let k = 0; k < f; k++) pu -= fin.c[i][k] * gj[k];
        sTheta += pu * pu;
      }
      g.push(gj);
    }
    const withK = hasValue && sTheta > 0;
    if (withK) lnKSe = Math.sqrt(s2 / sTheta);
    for (let k = 0; k < f; k++)
      for (let j = 0; j < w; j++) {
        const v = s2 * (inv[k][k] + (withK ? (g[j][k] * g[j][k]) / sTheta : 0));
        fittedSe[k][j] = v >= 0 && Number.isFinite(v) ? Math.sqrt(v) : null;
      }
  } else if (nonNegative && fin.proj.atBound) {
    const gram = Array.from({ length: f }, (_, a) =>
      Array.from({ length: f }, (_, b) => fin.c.reduce((sum, row) => sum + row[a] * row[b], 0)),
    );
    const cache = new Map<string, { free: number[]; inv: number[][] | null }>();
    for (let j = 0; j < w; j++) {
      const free = fitted.map((_, k) => k).filter((k) => !(fin.proj.atBound as boolean[][])[k][j]);
      const key = free.join(',');
      let entry = cache.get(key);
      if (!entry) {
        entry = { free, inv: free.length ? invertSpd(free.map((a) => free.map((b) => gram[a][b]))) : null };
        cache.set(key, entry);
      }
      const entryInv = entry.inv;
      if (entryInv) free.forEach((k, idx) => (fittedSe[k][j] = Math.sqrt(s2 * entryInv[idx][idx])));
    }
  }
  if (fin.proj.rank < f) {
    warnings.push(
      `${model.label}: the concentrations of the ${f} absorbing species are linearly dependent in these mixtures, ` +
        `so their spectra are not separately determined; say which species absorb or hold a reactant's spectrum`,
    );
  }

  const baselineIndex = fitted.findIndex((col) => col.role === 'baseline');
  const speciesSpectra: SpeciesSpectrum[] = columns.flatMap((col): SpeciesSpectrum[] => {
    if (col.role === 'baseline') return [];
    const role = col.role;
    if (col.held)
      return [
        { species: col.species, role, source: 'held', epsilon: [...col.held], se: col.held.map(() => null) },
      ];
    const k = fitted.indexOf(col);
    return [{ species: col.species, role, source: 'fitted', epsilon: fin.proj.spectra[k], se: fittedSe[k] }];
  });
  if (!nonNegative) {
    for (const sp of speciesSpectra) {
      if (sp.source !== 'fitted') continue;
      const below = sp.epsilon.filter((e, j) => {
        const se = sp.se[j];
        return se !== null && e < -3 * se;
      }).length;
      if (below > 0)
        warnings.push(
          `${model.label}: the fitted spectrum of ${sp.species} is negative beyond 3 SE at ${below} of ${w} wavelengths ` +
            `(a sign that this model does not describe the mixtures)`,
        );
    }
  }
  const statusNote = kStatusNote(model.label, status, message);
  if (statusNote) warnings.push(statusNote);

  const k = Math.exp(verdict.lnKHat);
  const aic = rssMin > 0 ? n * Math.log(rssMin / n) + 2 * p : null;
  const aicc = aic !== null && n - p - 1 > 0 ? aic + (2 * p * (p + 1)) / (n - p - 1) : null;
  return {
    model: model.label,
    mixtures: m,
    wavelengths: w,
    n,
    p,
    df,
    kStatus: status,
    kUnit: unit,
    k: hasValue && Number.isFinite(k) ? k : null,
    kSe: hasValue && lnKSe !== null && Number.isFinite(k * lnKSe) ? k * lnKSe : null,
    kCi95: verdict.kCi95,
    kLowerBound95: verdict.kLowerBound95,
    kUpperBound95: verdict.kUpperBound95,
    log10K: hasValue ? verdict.lnKHat / LN10 : null,
    log10KSe: hasValue && lnKSe !== null ? lnKSe / LN10 : null,
    rss: rssMin,
    residualSd: Math.sqrt(s2),
    aic,
    aicc,
    speciesSpectra,
    baseline:
      baselineIndex < 0 ? null : { absorbance: fin.proj.spectra[baselineIndex], se: fittedSe[baselineIndex] },
    speciesConcentrations: allSpecies.map((sp) => ({
      species: sp.species,
      role: sp.role,
      concentrationM: fin.states.map((st) => concentrationOf(sp, st)),
    })),
    residuals: fin.proj.residuals,
    rank: fin.proj.rank,
    converged: status !== 'not-converged',
    iterations: lm.iterations,
    message,
    warnings,
  };
}
