import { fcnnls } from 'ml-fcnnls';
import { SingularValueDecomposition } from 'ml-matrix';
import { AnalysisError } from './errors';

/** Species spectra solved by linear least squares for given concentrations, and what is left over. */
export interface SpectralProjection {
  /** Species spectra E, species × wavelengths (absorbance per unit of the concentration column). */
  spectra: number[][];
  /** R = Y − C·E, mixtures × wavelengths. */
  residuals: number[][];
  /** ‖R‖², absorbance². */
  rss: number;
  /** Numerical rank of C (its columns scaled to unit length). Below the number of species: E is not unique. */
  rank: number;
  /** (CᵀC)⁻¹, species × species, when C has full column rank (unconstrained solution only); else null. */
  inverseGram: number[][] | null;
  /** Non-negative solution: true where Eₖⱼ is held at 0 by its constraint; null for the unconstrained one. */
  atBound: boolean[][] | null;
  /** False when the non-negative solver ran out of iterations (E is then the clipped unconstrained one). */
  converged: boolean;
}

export interface SpectralProjectionOptions {
  /** Constrain every Eₖⱼ ≥ 0. Default false. */
  nonNegative?: boolean;
  /** Iteration limit of the non-negative solver. Default 100 × species. */
  maxIterations?: number;
}

/**
 * The linear step of a separable (variable-projection) fit: for fixed concentrations C (mixtures × species)
 * the spectra E minimising ‖Y − C·E‖² (Y mixtures × wavelengths), one least-squares problem per wavelength
 * sharing C. Unconstrained: E = C⁺·Y with the pseudo-inverse from ml-matrix's SVD of C (columns scaled to
 * unit length first so that their magnitudes do not decide the rank; singular values under
 * max(m, s)·ε_mach·s₁ count as zero and E is then the minimum-norm solution). Non-negative: Eₖⱼ ≥ 0 by the
 * fast combinatorial NNLS of Van Benthem & Keenan (ml-fcnnls), the active-set method of Lawson & Hanson
 * solved for all wavelengths together.
 *
 * Units: Y absorbance; C in the units whose product with E is absorbance (here mol/L × path length, cm), so
 * E comes out in L·mol⁻¹·cm⁻¹.
 * Reference: Golub G.H. & Pereyra V. (1973) SIAM J. Numer. Anal. 10, 413 and (2003) Inverse Problems 19, R1
 * (variable projection); Golub & Van Loan, Matrix Computations, 4th ed., §5.5 (pseudo-inverse, numerical
 * rank); Lawson C.L. & Hanson R.J., Solving Least Squares Problems (SIAM, 1995), ch. 23; Van Benthem M.H. &
 * Keenan M.R. (2004) J. Chemometrics 18, 441 (FCNNLS).
 *
 * @param concentrations C, mixtures × species
 * @param absorbance Y, mixtures × wavelengths
 * @throws AnalysisError 'invalid-input' when the row counts differ or a value is not finite
 * @example
 * // invented: two species, two wavelengths, exact data
 * const c = [[1e-4, 0], [0, 1e-4], [1e-4, 1e-4]];
 * const y = [[0.1, 0.2], [0.3, 0.05], [0.4, 0.25]];
 * projectSpectra(c, y).spectra; // [[1000, 2000], [3000, 500]]
 */
export function projectSpectra(
  concentrations: readonly (readonly number[])[],
  absorbance: readonly (readonly number[])[],
  options: SpectralProjectionOptions = {},
): SpectralProjection {
  const m = concentrations.length;
  const s = m > 0 ? concentrations[0].length : 0;
  const w = absorbance.length > 0 ? absorbance[0].length : 0;
  if (absorbance.length !== m || m === 0 || s === 0)
    throw new AnalysisError('invalid-input', 'concentrations and absorbances need the same mixtures');
  // Unit-length columns: the rank decision and the non-negative solver's tolerance then do not depend on
  // whether a species' concentrations are 1e-3 or 1e-8 mol/L.
  const scale = new Array<number>(s).fill(0);
  for (const row of concentrations) {
    if (row.length !== s || !row.every(Number.isFinite))
      throw new AnalysisError('invalid-input', 'every concentration must be a finite number');
    for (let k = 0; k < s; k++) scale[k] += row[k] * row[k];
  }
  for (let k = 0; k < s; k++) scale[k] = scale[k] > 0 ? Math.sqrt(scale[k]) : 1;
  const scaled = concentrations.map((row) => row.map((v, k) => v / scale[k]));

  const scaledSpectra: number[][] = Array.from({ length: s }, () => new Array<number>(w).fill(0));
  let inverseGram: number[][] | null = null;
  let atBound: boolean[][] | null = null;
  let converged = true;
  const svd = new SingularValueDecomposition(scaled, { autoTranspose: true });
  const sv = svd.diagonal;
  const tol = Math.max(m, s) * Number.EPSILON * Math.max(0, ...sv);
  const u = svd.leftSingularVectors;
  const v = svd.rightSingularVectors;
  const kept: number[] = [];
  for (let r = 0; r < sv.length; r++) if (sv[r] > tol) kept.push(r);
  const rank = kept.length;

  const unconstrained = (): void => {
    // E = V·Σ⁻¹·Uᵀ·Y over the kept singular triplets; the big products are plain loops over the rows of Y.
    for (const r of kept) {
      const coef = new Array<number>(w).fill(0);
      for (let i = 0; i < m; i++) {
        const ui = u.get(i, r);
        if (ui === 0) continue;
        const yi = absorbance[i];
        for (let j = 0; j < w; j++) coef[j] += ui * yi[j];
      }
      for (let k = 0; k < s; k++) {
        const f = v.get(k, r) / sv[r];
        if (f === 0) continue;
        const row = scaledSpectra[k];
        for (let j = 0; j < w; j++) row[j] += f * coef[j];
      }
    }
  };

  if (options.nonNegative) {
    try {
      const gradientScale = Math.max(...absorbance.map((row) => Math.max(...row.map(Math.abs))), 1e-300);
      const solution = fcnnls(scaled, absorbance as number[][], {
        maxIterations: options.maxIterations ?? 100 * s,
        gradientTolerance: 1e-10 * gradientScale,
      }).K;
      for (let k = 0; k < s; k++)
        for (let j = 0; j < w; j++) scaledSpectra[k][j] = Math.max(0, solution.get(k, j));
    } catch {
      // ml-fcnnls throws when it runs out of iterations: keep a feasible answer and say so.
      converged = false;
      unconstrained();
      for (const row of scaledSpectra) for (let j = 0; j < w; j++) row[j] = Math.max(0, row[j]);
    }
    atBound = scaledSpectra.map((row) => row.map((e) => e <= 0));
  } else {
    unconstrained();
    if (rank === s) {
      // (C̃ᵀC̃)⁻¹ = V·Σ⁻²·Vᵀ, then undo the column scaling: (CᵀC)⁻¹ = D⁻¹(C̃ᵀC̃)⁻¹D⁻¹.
      inverseGram = Array.from({ length: s }, (_, a) =>
        Array.from({ length: s }, (_, b) => {
          let sum = 0;
          for (const r of kept) sum += (v.get(a, r) * v.get(b, r)) / (sv[r] * sv[r]);
          return sum / (scale[a] * scale[b]);
        }),
      );
    }
  }

  const residuals: number[][] = new Array(m);
  let rss = 0;
  for (let i = 0; i < m; i++) {
    const yi = absorbance[i];
    if (yi.length !== w) throw new AnalysisError('invalid-input', 'every mixture needs the same wavelengths');
    const ri = new Array<number>(w);
    for (let j = 0; j < w; j++) ri[j] = yi[j];
    const ci = scaled[i];
    for (let k = 0; k < s; k++) {
      const c = ci[k];
      if (c === 0) continue;
      const ek = scaledSpectra[k];
      for (let j = 0; j < w; j++) ri[j] -= c * ek[j];
    }
    for (let j = 0; j < w; j++) rss += ri[j] * ri[j];
    residuals[i] = ri;
  }
  if (!Number.isFinite(rss))
    throw new AnalysisError('invalid-input', 'every absorbance must be a finite number');
  const spectra = scaledSpectra.map((row, k) => row.map((e) => e / scale[k]));
  return { spectra, residuals, rss, rank, inverseGram, atBound, converged };
}
