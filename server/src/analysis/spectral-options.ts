import { AnalysisError } from './errors';
import { AnalysisSettings, Exclusion, resolveAnalysisSettings } from './options';

/**
 * How a reactant's spectrum enters a whole-spectrum fit: fitted with the others, not absorbing, or held at
 * the spectrum of the mixtures that hold only that reactant (e.g. the ends of a Job's series).
 */
export type ReactantSpectrumSetting = 'fitted' | 'none' | 'from-pure-mixtures';

/**
 * Settings of the whole-spectrum analysis. The fields shared with {@link AnalysisSettings} mean the same, so a
 * batch's settings can be passed as they are; the others are its own.
 */
export interface SpectralSettings extends Pick<
  AnalysisSettings,
  | 'pathLengthCm'
  | 'pathLengthByPositionCm'
  | 'candidates'
  | 'exclusions'
  | 'ambiguityDeltaAic'
  | 'ruledOutDeltaAic'
  | 'fit'
  | 'solver'
  | 'fitBaseline'
> {
  /** Wavelength range analysed, nm (inclusive). Default: every wavelength read. */
  fromNm?: number | null;
  toNm?: number | null;
  /** SD of one blank-corrected mixture absorbance (for the species count). Default: estimated. */
  absorbanceSd?: number | null;
  /** Reactant A's (B's) spectrum. Default 'fitted'. */
  reactantA?: ReactantSpectrumSetting;
  reactantB?: ReactantSpectrumSetting;
  /** Constrain the fitted spectra to ε ≥ 0. Default false. */
  nonNegativeSpectra?: boolean;
  /** Smallest fraction of the wavelengths a mixture must have usable readings at to be kept. Default 0.5. */
  minWavelengthCoverage?: number;
  /** Compute the profile-likelihood interval of K. Default true. */
  profile?: boolean;
}

/** Every setting filled in: what the analysis used (echoed in the result). */
export interface ResolvedSpectralSettings {
  pathLengthCm: number;
  pathLengthByPositionCm: Record<string, number>;
  candidates: string[];
  exclusions: Exclusion[];
  ambiguityDeltaAic: number;
  ruledOutDeltaAic: number;
  fit: { maxIterations: number; parameterTolerance: number };
  solver: { tolerance: number; maxIterations: number };
  fromNm: number | null;
  toNm: number | null;
  absorbanceSd: number | null;
  reactantA: ReactantSpectrumSetting;
  reactantB: ReactantSpectrumSetting;
  nonNegativeSpectra: boolean;
  fitBaseline: boolean;
  minWavelengthCoverage: number;
  profile: boolean;
}

const REACTANT_SETTINGS: readonly ReactantSpectrumSetting[] = ['fitted', 'none', 'from-pure-mixtures'];

function optionalPositive(name: string, v: number | null | undefined): number | null {
  if (v == null) return null;
  if (!(v > 0) || !Number.isFinite(v))
    throw new AnalysisError('invalid-settings', `${name} must be a positive number`);
  return v;
}

function reactant(name: string, v: ReactantSpectrumSetting | undefined): ReactantSpectrumSetting {
  const r = v ?? 'fitted';
  if (!REACTANT_SETTINGS.includes(r))
    throw new AnalysisError('invalid-settings', `${name} must be one of ${REACTANT_SETTINGS.join(', ')}`);
  return r;
}

/**
 * Resolves and checks the whole-spectrum settings once: the shared fields by
 * {@link resolveAnalysisSettings} (same defaults and messages), the rest here.
 *
 * Units: wavelengths nm, path cm, absorbance SD dimensionless.
 * Reference: defaults as documented per field (Burnham & Anderson 2002 for the ΔAIC limits).
 *
 * @throws AnalysisError 'invalid-settings' for an empty or reversed wavelength range, a non-positive SD, an
 *   unknown reactant setting, or any invalid shared field
 * @example
 * resolveSpectralSettings({ fromNm: 400, toNm: 700 }).candidates; // ["1:1", "1:2", "2:1", "1:3"]
 */
export function resolveSpectralSettings(settings: SpectralSettings = {}): ResolvedSpectralSettings {
  const shared = resolveAnalysisSettings({
    pathLengthCm: settings.pathLengthCm,
    pathLengthByPositionCm: settings.pathLengthByPositionCm,
    candidates: settings.candidates,
    exclusions: settings.exclusions,
    ambiguityDeltaAic: settings.ambiguityDeltaAic,
    ruledOutDeltaAic: settings.ruledOutDeltaAic,
    fit: settings.fit,
    solver: settings.solver,
  });
  const fromNm = optionalPositive('the start of the wavelength range', settings.fromNm);
  const toNm = optionalPositive('the end of the wavelength range', settings.toNm);
  if (fromNm !== null && toNm !== null && fromNm > toNm)
    throw new AnalysisError('invalid-settings', 'the wavelength range starts after it ends');
  if (settings.fitBaseline && settings.nonNegativeSpectra)
    throw new AnalysisError(
      'invalid-settings',
      'a fitted baseline can be negative: not with non-negative spectra',
    );
  const coverage = settings.minWavelengthCoverage ?? 0.5;
  if (!(coverage > 0 && coverage <= 1))
    throw new AnalysisError('invalid-settings', 'the wavelength coverage of a mixture must be in (0, 1]');
  return {
    pathLengthCm: shared.pathLengthCm,
    pathLengthByPositionCm: shared.pathLengthByPositionCm,
    candidates: shared.candidates,
    exclusions: shared.exclusions,
    ambiguityDeltaAic: shared.ambiguityDeltaAic,
    ruledOutDeltaAic: shared.ruledOutDeltaAic,
    fit: shared.fit,
    solver: shared.solver,
    fromNm,
    toNm,
    absorbanceSd: optionalPositive('the absorbance SD', settings.absorbanceSd),
    reactantA: reactant('reactant A’s spectrum', settings.reactantA),
    reactantB: reactant('reactant B’s spectrum', settings.reactantB),
    nonNegativeSpectra: settings.nonNegativeSpectra ?? false,
    fitBaseline: settings.fitBaseline ?? false,
    minWavelengthCoverage: coverage,
    profile: settings.profile ?? true,
  };
}
