import { MixtureRecipe } from './dilution';

/** A mixture with its recipe and its measured absorbance: the input of the K-uncertainty methods. */
export interface MixtureMeasurement extends MixtureRecipe {
  /** Blank-corrected absorbance (mean of the replicates). */
  absorbance: number;
  pathLengthCm: number;
  /** Number of readings averaged into `absorbance` (default 1). */
  replicates?: number;
}

/** Standard uncertainties of the inputs of a mixture, as the K-uncertainty methods use them. */
export interface InputUncertainties {
  /** Relative SD of each pipetted volume (fraction). */
  pipetteRelSd: number;
  /** Relative SD of a made-up total volume (volumetric flask), fraction. */
  flaskRelSd: number;
  /** Relative SD of each stock concentration, fraction (one draw per distinct stock). */
  stockRelSd: number;
  /** SD of one absorbance reading; null: use the residual SD of the global fit. */
  absorbanceSd: number | null;
}

/**
 * True when the total volume was made up to a mark, i.e. V_T > V_A + V_B (a diluent was added, so V_T
 * is an independent input with its own tolerance); otherwise V_T = V_A + V_B.
 *
 * Units: volumes mL. Reference: JCGM 100:2008 §5.1 (independent input quantities).
 *
 * @example
 * isMadeUpToVolume({ stockAM: 5e-3, volumeAMl: 1, stockBM: 5e-3, volumeBMl: 2, totalVolumeMl: 10 }); // true
 */
export function isMadeUpToVolume(m: MixtureRecipe): boolean {
  return m.totalVolumeMl !== undefined && m.totalVolumeMl > (m.volumeAMl + m.volumeBMl) * (1 + 1e-9);
}
