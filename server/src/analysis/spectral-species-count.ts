import { SingularValueDecomposition } from 'ml-matrix';
import { AnalysisError } from './errors';

/** How many absorbing species a mixtures × wavelengths absorbance matrix holds, from its singular values. */
export interface SpeciesCountResult {
  /** Singular values of the matrix, largest first (absorbance units): the scree plot. */
  singularValues: number[];
  /** Singular values above this are signal, below it noise (absorbance units): the line on the scree plot. */
  noiseLevel: number;
  /** SD of one matrix entry (absorbance): as given, or estimated from the median singular value. */
  noiseSd: number;
  noiseSource: 'given' | 'estimated';
  /** Number of singular values above `noiseLevel`. */
  speciesCount: number;
  /** The rule used, in words. */
  method: string;
  warnings: string[];
}

export interface SpeciesCountOptions {
  /** SD of one matrix entry (absorbance), when known; otherwise it is estimated. */
  absorbanceSd?: number | null;
}

/**
 * Optimal hard threshold coefficient for singular values with known noise (Gavish & Donoho 2014):
 * λ*(β) = √(2(β + 1) + 8β / ((β + 1) + √(β² + 14β + 1))), β = (smaller dimension)/(larger dimension);
 * the threshold is λ*(β)·√n·σ with n the larger dimension. λ*(1) = 4/√3.
 *
 * @example
 * gavishDonohoLambda(1); // 2.3094 (= 4/√3)
 */
export function gavishDonohoLambda(beta: number): number {
  return Math.sqrt(2 * (beta + 1) + (8 * beta) / (beta + 1 + Math.sqrt(beta * beta + 14 * beta + 1)));
}

/**
 * Hard threshold coefficient for unknown noise (Gavish & Donoho 2014, their cubic approximation):
 * ω(β) ≈ 0.56β³ − 0.95β² + 1.82β + 1.43, the threshold being ω(β)·(median singular value). It stands for
 * λ*(β)/√μ_β, μ_β the median of the Marchenko–Pastur distribution.
 *
 * @example
 * gavishDonohoOmega(1); // 2.86
 */
export function gavishDonohoOmega(beta: number): number {
  return 0.56 * beta ** 3 - 0.95 * beta ** 2 + 1.82 * beta + 1.43;
}

/**
 * Number of absorbing species from the singular values s₁ ≥ s₂ ≥ … of the blank-corrected absorbance
 * matrix (mixtures × wavelengths): by Beer–Lambert A = l·C·E, so without noise the rank of A is the number
 * of species with linearly independent concentrations and spectra; noise adds singular values of its own.
 * The count is the number of sᵢ above the noise level τ:
 * - absorbance SD σ given: τ = λ*(β)·√n·σ, the optimal hard threshold of Gavish & Donoho for known noise
 *   (just above the largest singular value pure noise reaches, σ(√m + √n), Marchenko–Pastur);
 * - not given: τ = ω(β)·s_med, their threshold for unknown noise, and σ̂ = τ/(λ*(β)·√n). This assumes
 *   fewer species than half the smaller dimension (the median singular value is then noise); give σ
 *   when the batch has only a few mixtures.
 * τ is never below the numerical-rank floor max(m, n)·ε_mach·s₁ (so noise-free data count their rank).
 * Anything common to every mixture counts as a component too: a baseline drift, and the error of the mean
 * blank subtracted from every row (singular value about √(m·n/n_blank)·σ, above τ when the blanks are fewer
 * than about m/2.6).
 * The SVD is ml-matrix's (Golub–Kahan–Reinsch, ported from JAMA).
 *
 * Units: absorbance (dimensionless) for the matrix, σ, sᵢ and τ.
 * Reference: Gavish M. & Donoho D.L. (2014) IEEE Trans. Inf. Theory 60, 5040, "The optimal hard threshold for
 * singular values is 4/√3"; Marchenko V.A. & Pastur L.A. (1967) Math. USSR-Sb. 1, 457; Golub G.H. & Van Loan
 * C.F., Matrix Computations, 4th ed., §5.4.1 (numerical rank); Malinowski E.R., Factor Analysis in
 * Chemistry, 3rd ed. (Wiley, 2002) (rank of spectroscopic data).
 *
 * @param absorbance mixtures × wavelengths, blank-corrected
 * @param options the absorbance SD of one entry, when known
 * @throws AnalysisError 'invalid-input' for an empty, ragged or non-finite matrix, or a negative SD
 * @example
 * // invented: the middle row is twice the first plus the last, so two species
 * const a = [[1, 2, 0], [2, 4, 1], [0, 0, 1]];
 * estimateSpeciesCount(a, { absorbanceSd: 0.001 }).speciesCount; // 2
 */
export function estimateSpeciesCount(
  absorbance: readonly (readonly number[])[],
  options: SpeciesCountOptions = {},
): SpeciesCountResult {
  const m = absorbance.length;
  const w = m > 0 ? absorbance[0].length : 0;
  if (m === 0 || w === 0) throw new AnalysisError('invalid-input', 'the absorbance matrix is empty');
  for (const row of absorbance) {
    if (row.length !== w)
      throw new AnalysisError('invalid-input', 'every mixture needs an absorbance at every wavelength');
    for (const v of row)
      if (!Number.isFinite(v)) throw new AnalysisError('invalid-input', 'the absorbance matrix has a gap');
  }
  const sd = options.absorbanceSd ?? null;
  if (sd !== null && !(sd >= 0 && Number.isFinite(sd)))
    throw new AnalysisError('invalid-input', 'the absorbance SD must be a number ≥ 0');
  const svd = new SingularValueDecomposition(absorbance as number[][], {
    autoTranspose: true,
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
  });
  const singularValues = svd.diagonal.map((v) => Math.max(0, v)).sort((u, v) => v - u);
  const small = Math.min(m, w);
  const large = Math.max(m, w);
  const beta = small / large;
  const lambda = gavishDonohoLambda(beta);
  const floor = large * Number.EPSILON * (singularValues[0] ?? 0);
  const warnings: string[] = [];
  let threshold: number;
  let noiseSd: number;
  let method: string;
  if (sd !== null) {
    threshold = lambda * Math.sqrt(large) * sd;
    noiseSd = sd;
    method = `singular values above λ*(β)·√n·σ = ${lambda.toFixed(3)}·√${large}·σ (Gavish–Donoho, σ given)`;
  } else {
    const sorted = singularValues.slice(0, small).sort((u, v) => u - v);
    const median = small % 2 ? sorted[(small - 1) / 2] : (sorted[small / 2 - 1] + sorted[small / 2]) / 2;
    const omega = gavishDonohoOmega(beta);
    threshold = omega * median;
    noiseSd = threshold / (lambda * Math.sqrt(large));
    method = `singular values above ω(β)·s_med = ${omega.toFixed(3)}·s_med (Gavish–Donoho, σ estimated)`;
  }
  const noiseLevel = Math.max(threshold, floor);
  const speciesCount = singularValues.filter((v) => v > noiseLevel).length;
  if (small === 1) warnings.push('one wavelength or one mixture: the count cannot exceed 1');
  // The median singular value is noise only while the species are fewer than half the smaller dimension;
  // an undercount would hide itself, so warn as soon as one more species would break that.
  else if (sd === null && 2 * (speciesCount + 1) > small)
    warnings.push(
      `only ${small} ${m <= w ? 'mixtures' : 'wavelengths'}: the noise level estimated from the median singular value ` +
        `may hide a species; give the absorbance SD for a count that does not rest on it`,
    );
  return {
    singularValues,
    noiseLevel,
    noiseSd,
    noiseSource: sd !== null ? 'given' : 'estimated',
    speciesCount,
    method,
    warnings,
  };
}
