/**
 * Shared input types of the analysis module. Pure data: no framework imports.
 * Units are in the names: M = mol/L, Ml = millilitres, Nm = nanometres, Cm = centimetres.
 */

/** What a position on a plate or in a cuvette sequence holds. */
export type SampleRole = 'blank' | 'standard' | 'unknown' | 'mixture' | 'control';

export const SAMPLE_ROLES: readonly SampleRole[] = ['blank', 'standard', 'unknown', 'mixture', 'control'];

/** One manifest row (PRODUCT.md manifest CSV), already validated. */
export interface SampleDefinition {
  /** `A1`…`P24` for plates, `C1`, `C2`, … for cuvette sequences. */
  position: string;
  sampleId: string;
  role: SampleRole;
  /** Standards: known concentration of the absorbing species, mol/L. */
  concentrationM?: number;
  /** Unknowns: factor applied to the computed concentration (default 1). */
  dilutionFactor?: number;
  /** Mixtures: stock concentration (mol/L) and pipetted volume (mL) of reactant A. */
  stockAM?: number;
  volumeAMl?: number;
  /** Mixtures: the same for reactant B. */
  stockBM?: number;
  volumeBMl?: number;
  /** Mixtures: final volume after dilution, mL. */
  totalVolumeMl?: number;
  /** Positions sharing a value are replicates of one another. */
  replicateGroup?: string;
}

/** Why a reading has no usable absorbance. */
export type ReadingFlag = 'saturated' | 'missing';

/** One absorbance reading as parsed from an instrument file. */
export interface Reading {
  position: string;
  wavelengthNm: number;
  /** Null when the instrument gave no number (saturated or empty cell): never a zero. */
  absorbance: number | null;
  flag?: ReadingFlag;
  /** ISO 8601 text as found in the file, when the file has one. */
  readTime?: string;
  temperatureC?: number;
  replicate?: number;
}
