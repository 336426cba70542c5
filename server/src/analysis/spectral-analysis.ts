import { AnalysisError } from './errors';
import { fitSpectralModel, ReactantSpectrum, SpectralFitResult } from './spectral-fit';
import { buildSpectralMatrix, SpectralMixtureRow } from './spectral-matrix';
import {
  ReactantSpectrumSetting,
  ResolvedSpectralSettings,
  resolveSpectralSettings,
  SpectralSettings,
} from './spectral-options';
import { spectralRowBasis } from './spectral-row-basis';
import { estimateSpeciesCount } from './spectral-species-count';
import { parseStoichiometry } from './stoichiometry-model';
import { rankStoichiometries, StoichiometryRanking } from './stoichiometry-ranking';
import { Reading, SampleDefinition } from './types';

/** The whole-spectrum analysis of a batch: plain JSON (no NaN, no Infinity). */
export interface SpectralAnalysisResult {
  wavelengthsNm: number[];
  /** The rows of the matrix, in order. */
  mixtures: SpectralMixtureRow[];
  /** Blank-corrected absorbance, mixtures × wavelengths (what was fitted). */
  absorbance: number[][];
  blankAbsorbance: number[];
  /** Number of absorbing species from the singular values, with the scree plot and its noise line. */
  speciesCount: number;
  singularValues: number[];
  noiseLevel: number;
  /** SD of one matrix entry (absorbance), given or estimated, and the rule used. */
  noiseSd: number;
  noiseSource: 'given' | 'estimated';
  speciesCountMethod: string;
  /** One whole-spectrum fit per candidate stoichiometry, in the order of the settings. */
  candidates: SpectralFitResult[];
  /** The candidates ranked by AIC, with the verdict (the single-wavelength ranking's rules). */
  ranking: StoichiometryRanking;
  best: string | null;
  settings: ResolvedSpectralSettings;
  warnings: string[];
}

/** A reactant's spectrum from the mixtures that hold only it: ε(λ) = Σ lcᵢ·Aᵢ(λ) / Σ (lcᵢ)², through the origin. */
function pureSpectrum(
  name: 'A' | 'B',
  mixtures: readonly SpectralMixtureRow[],
  absorbance: readonly (readonly number[])[],
): { epsilon: number[] } {
  const rows = mixtures
    .map((mx, i) => ({
      lc: mx.pathLengthCm * (name === 'A' ? mx.a0M : mx.b0M),
      other: name === 'A' ? mx.b0M : mx.a0M,
      i,
    }))
    .filter((r) => r.lc > 0 && r.other === 0);
  if (rows.length === 0)
    throw new AnalysisError(
      'invalid-settings',
      `reactant ${name}'s spectrum from pure mixtures needs a mixture with ${name} only (no ${name === 'A' ? 'B' : 'A'})`,
    );
  const sxx = rows.reduce((s, r) => s + r.lc * r.lc, 0);
  const w = absorbance[0].length;
  const epsilon = new Array<number>(w).fill(0);
  for (const r of rows) for (let j = 0; j < w; j++) epsilon[j] += (r.lc * absorbance[r.i][j]) / sxx;
  return { epsilon };
}

function reactantOption(
  name: 'A' | 'B',
  setting: ReactantSpectrumSetting,
  mixtures: readonly SpectralMixtureRow[],
  absorbance: readonly (readonly number[])[],
): ReactantSpectrum {
  return setting === 'from-pure-mixtures' ? pureSpectrum(name, mixtures, absorbance) : setting;
}

/**
 * Whole-spectrum analysis of a batch: builds the mixtures × wavelengths matrix (blank-corrected per
 * wavelength, replicate-group means, an optional wavelength range), counts the absorbing species from its
 * singular values (with the noise level for a scree plot), fits every candidate stoichiometry to all
 * wavelengths at once (K with its profile-likelihood interval, each species' spectrum with SEs, the residual
 * map) and ranks the candidates by AIC as the single-wavelength analysis does. A reactant's spectrum is
 * fitted, absent, or held at the spectrum of the mixtures that hold only that reactant.
 *
 * Units: wavelength nm, absorbance dimensionless, concentrations mol/L, ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: see {@link estimateSpeciesCount}, {@link fitSpectralModel} and {@link rankStoichiometries}
 * (Gavish & Donoho 2014; Golub & Pereyra 2003; Burnham & Anderson 2002).
 *
 * @param readings parsed readings at several wavelengths (spectra)
 * @param samples manifest rows (blanks and mixtures are used)
 * @param settings whole-spectrum settings; defaults by {@link resolveSpectralSettings}
 * @throws AnalysisError 'invalid-settings' for bad settings; 'too-few-points' when fewer than two mixtures
 *   or no wavelength have usable spectra
 * @example
 * const result = analyzeSpectra(run.readings, manifest.samples, { fromNm: 380, toNm: 680, candidates: ['1:1', '1:2'] });
 * result.speciesCount; // 3
 * result.best; // "1:1"
 */
export function analyzeSpectra(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: SpectralSettings = {},
): SpectralAnalysisResult {
  const s = resolveSpectralSettings(settings);
  const matrix = buildSpectralMatrix(readings, samples, s);
  const warnings = [...matrix.warnings];
  const count = estimateSpeciesCount(matrix.absorbance, { absorbanceSd: s.absorbanceSd });
  warnings.push(...count.warnings);
  const reactantA = reactantOption('A', s.reactantA, matrix.mixtures, matrix.absorbance);
  const reactantB = reactantOption('B', s.reactantB, matrix.mixtures, matrix.absorbance);
  // A fitted baseline is one more component of the matrix (a constant "species").
  const absorbing =
    1 + (s.reactantA === 'none' ? 0 : 1) + (s.reactantB === 'none' ? 0 : 1) + (s.fitBaseline ? 1 : 0);
  if (count.speciesCount < absorbing)
    warnings.push(
      `the singular values show ${count.speciesCount} absorbing species but the fits take ${absorbing} to absorb: ` +
        `their spectra may not be separately determined; say which reactant does not absorb`,
    );
  else if (count.speciesCount > absorbing)
    warnings.push(
      `the singular values show ${count.speciesCount} absorbing species but the fits hold only ${absorbing}: ` +
        `another complex, scattering, a drifting baseline, or the error of the mean blank (shared by every ` +
        `mixture; with few blanks it shows at many wavelengths) may be present — a fitted baseline takes up the last two`,
    );
  // One basis of the spectra's row space serves every candidate (the held spectra are the same for all).
  const heldSpectra = [reactantA, reactantB].flatMap((r) => (typeof r === 'object' ? [r.epsilon] : []));
  const rowBasis =
    !s.nonNegativeSpectra && matrix.wavelengthsNm.length > matrix.mixtures.length + heldSpectra.length
      ? spectralRowBasis(matrix.absorbance, heldSpectra)
      : undefined;
  const candidates = s.candidates.map((label) =>
    fitSpectralModel(matrix.mixtures, matrix.absorbance, parseStoichiometry(label), {
      reactantA,
      reactantB,
      nonNegativeSpectra: s.nonNegativeSpectra,
      fitBaseline: s.fitBaseline,
      rowBasis,
      maxIterations: s.fit.maxIterations,
      parameterTolerance: s.fit.parameterTolerance,
      solverTolerance: s.solver.tolerance,
      solverMaxIterations: s.solver.maxIterations,
      profile: s.profile,
    }),
  );
  const ranking = rankStoichiometries(
    candidates.map((c) => ({
      model: c.model,
      kStats: null,
      fit: { converged: c.converged, aic: c.aic, status: c.kStatus, message: c.message },
    })),
    { ambiguityDeltaAic: s.ambiguityDeltaAic, ruledOutDeltaAic: s.ruledOutDeltaAic },
  );
  return {
    wavelengthsNm: matrix.wavelengthsNm,
    mixtures: matrix.mixtures,
    absorbance: matrix.absorbance,
    blankAbsorbance: matrix.blankAbsorbance,
    speciesCount: count.speciesCount,
    singularValues: count.singularValues,
    noiseLevel: count.noiseLevel,
    noiseSd: count.noiseSd,
    noiseSource: count.noiseSource,
    speciesCountMethod: count.method,
    candidates,
    ranking,
    best: ranking.best,
    settings: s,
    warnings,
  };
}
