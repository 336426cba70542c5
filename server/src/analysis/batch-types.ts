/**
 * The result of {@link analyzeBatch}: one plain, JSON-serialisable object (no class instances, no NaN
 * or Infinity — undefined quantities are null) that the server stores, the CLI prints and the batch
 * page renders. Units are in the field names: M = mol/L, Cm = cm, Nm = nm, Ml = mL.
 */
import { BenesiHildebrandResult } from './benesi-hildebrand';
import { BlankCorrection } from './blank';
import { CalibrationResult } from './calibration';
import { GlobalFitResult } from './global-fit';
import { IceRow } from './ice-table';
import { JobResult } from './job';
import { KMonteCarlo } from './monte-carlo';
import { Exclusion, ResolvedAnalysisSettings } from './options';
import { KPropagation } from './uncertainty-propagation';
import { MoleRatioResult } from './mole-ratio';
import { KStatement } from './number-format';
import { SampleRole } from './types';

/** 3: the settings carry the reporting unit and recovery limits; controls their nominal value and recovery. */
export const BATCH_RESULT_SCHEMA_VERSION = 3;

/** What happened to one position. */
export type PositionStatus = 'used' | 'excluded' | 'saturated' | 'missing' | 'no-sample' | 'no-reading';

/** Machine-readable QC codes; thresholds come from the settings. */
export type QcCode =
  | 'above-linear-range'
  | 'negative-absorbance'
  | 'replicate-cv-high'
  | 'calibration-r2-low'
  | 'calibration-outlier'
  | 'no-calibration'
  | 'below-lod'
  | 'below-loq'
  | 'saturated-reading'
  | 'missing-reading'
  | 'candidate-impossible'
  | 'k-not-constant'
  | 'fit-not-converged'
  | 'stoichiometry-ambiguous'
  | 'calibration-curvature'
  | 'k-poorly-determined'
  | 'k-lower-bound'
  | 'k-fits-disagree'
  | 'job-disagrees'
  | 'mole-ratio-disagrees'
  | 'recovery-out-of-limits';

/** One QC finding, for a person to review. */
export interface QcFlag {
  code: QcCode;
  severity: 'info' | 'warning' | 'error';
  message: string;
  position: string | null;
  sampleId: string | null;
  /** The value that tripped the check and the threshold it was held against. */
  value: number | null;
  threshold: number | null;
}

/** One plate well or cuvette position. */
export interface PositionResult {
  position: string;
  sampleId: string | null;
  role: SampleRole | null;
  replicateGroup: string | null;
  /** Mean of the readings at the analysed wavelength (null when none is usable). */
  absorbanceRaw: number | null;
  /** Number of readings found at the analysed wavelength. */
  reads: number;
  pathLengthCm: number;
  /** A − blank, scaled to the batch path length; null unless used. */
  absorbanceCorrected: number | null;
  status: PositionStatus;
  exclusionReason: string | null;
}

/** Mean, SD and CV of the corrected absorbance over the positions of one replicate group. */
export interface ReplicateGroupResult {
  /** The replicate_group value, or the position when the sample has none. */
  group: string;
  sampleId: string;
  role: SampleRole;
  positions: string[];
  /** Positions that contributed. */
  n: number;
  /** Positions with a missing or saturated reading. */
  skipped: number;
  /** Positions excluded by a person. */
  excluded: number;
  mean: number | null;
  sd: number | null;
  cv: number | null;
}

/** Concentration of an unknown (or a control) read from the calibration. */
export interface UnknownResult {
  sampleId: string;
  group: string;
  positions: string[];
  n: number;
  /** Mean corrected absorbance. */
  absorbance: number | null;
  dilutionFactor: number;
  /** In the original sample (after the dilution factor), mol/L; null without calibration or reading. */
  concentrationM: number | null;
  seM: number | null;
  flags: QcCode[];
}

/** A control or check standard: read back like an unknown, and compared with its nominal value. */
export interface ControlResult extends UnknownResult {
  /** From the manifest's concentration_M, mol/L; null when it gives none. */
  nominalM: number | null;
  /** concentrationM / nominalM × 100, %; null without both. */
  recoveryPct: number | null;
}

/** One equilibrium mixture with its ICE table under every candidate. */
export interface MixtureResult {
  sampleId: string;
  group: string;
  positions: string[];
  n: number;
  absorbance: number | null;
  /** Initial concentrations by C₁V₁ = C₂V₂, mol/L. */
  a0M: number;
  b0M: number;
  /** B₀/(A₀ + B₀). */
  moleFractionB: number;
  totalVolumeMl: number;
  /** Complex at equilibrium x = A/(ε·l), mol/L; null without ε. */
  productM: number | null;
  ice: IceRow[];
  flags: QcCode[];
}

/** One candidate stoichiometry: per-mixture K spread, global fit and its place in the ranking. */
export interface CandidateResult {
  model: string;
  a: number;
  b: number;
  /** Unit of K, e.g. "L²·mol⁻²". */
  kUnit: string;
  /** Per-mixture K over feasible mixtures, M^(1−a−b); CV a fraction. Null without ε or mixtures. */
  kMean: number | null;
  kSd: number | null;
  kCv: number | null;
  nFeasible: number;
  nInfeasible: number;
  /** The global fit the batch's settings describe (ε fixed when the batch has an ε source). */
  fit: GlobalFitResult | null;
  /** With ε fixed: the fit with ε free as well, as a cross-check (null when ε is fitted anyway). */
  freeFit: GlobalFitResult | null;
  /** This candidate's own fit notes. */
  warnings: string[];
  rank: number;
  deltaAic: number | null;
  akaikeWeight: number | null;
  ruledOut: boolean;
  reason: string;
}

export interface StoichiometryResult {
  /** Best first. */
  candidates: CandidateResult[];
  best: string | null;
  ambiguous: boolean;
  /** e.g. "1:1 fits best; 1:2 is ruled out: its K drifts 45 % across mixtures". */
  verdict: string;
}

/** Uncertainty of the best candidate's K. */
export interface UncertaintyResult {
  model: string;
  propagation: KPropagation | null;
  /** Null when Monte Carlo is off (draws = 0) or failed. */
  monteCarlo: KMonteCarlo | null;
}

/** Job's analysis of the mixtures that form a Job's series. */
export interface JobBatchResult extends JobResult {
  sampleIds: string[];
  /** A₀ + B₀ of the series, mol/L. */
  totalConcentrationM: number;
}

/** Mole-ratio analysis of mixtures with one reactant fixed and the other rising. */
export interface MoleRatioBatchResult extends MoleRatioResult {
  sampleIds: string[];
  /** The reactant held constant and its concentration, mol/L. */
  fixed: 'A' | 'B';
  fixedConcentrationM: number;
}

/** Where the ε of the complex came from, and what it was. */
export interface EpsilonSource {
  kind: 'standards' | 'given' | 'none';
  epsilonLPerMolCm: number | null;
  epsilonSe: number | null;
  /** Absorbance subtracted before A/(ε·l): the calibration intercept (standards), else 0. */
  interceptAbsorbance: number;
  /** Standard error of that intercept and its covariance with ε (from the calibration), else 0. */
  interceptSe: number;
  epsilonInterceptCov: number;
  /** Plain-language account, e.g. "ε from this batch's standards (calibration line, intercept subtracted as for the unknowns)". */
  note: string;
}

/** The batch's one K: the best candidate's, as every screen, report, mail and the CLI state it. */
export interface KHeadline extends KStatement {
  kUnit: string;
  epsilonFixed: boolean;
  /** formatK(...) of this headline. */
  text: string;
}

export interface BenesiHildebrandBatchResult {
  applicable: boolean;
  /** Why it was (not) applied. */
  reason: string;
  sampleIds: string[];
  result: BenesiHildebrandResult | null;
  /** K(Benesi–Hildebrand) / K(global 1:1 fit); null when either is missing. */
  kRatioToGlobalFit: number | null;
}

/** Everything one batch analysis produces. */
export interface BatchResult {
  schemaVersion: number;
  /** The wavelength analysed, nm (null when there were no readings). */
  wavelengthNm: number | null;
  pathLengthCm: number;
  settings: ResolvedAnalysisSettings;
  positions: PositionResult[];
  /** Exclusions applied (as given in the settings). */
  exclusions: Exclusion[];
  blank: BlankCorrection;
  replicates: ReplicateGroupResult[];
  calibration: CalibrationResult | null;
  unknowns: UnknownResult[];
  /** Results stored before schema version 3 lack `nominalM` and `recoveryPct`. */
  controls: ControlResult[];
  mixtures: MixtureResult[];
  stoichiometry: StoichiometryResult | null;
  uncertainty: UncertaintyResult | null;
  job: JobBatchResult | null;
  moleRatio: MoleRatioBatchResult | null;
  benesiHildebrand: BenesiHildebrandBatchResult | null;
  epsilonSource: EpsilonSource;
  /** The best candidate's K; null without mixtures or a best candidate. */
  headline: KHeadline | null;
  /** Said once wherever K is shown (see K_CONCENTRATION_CONSTANT_NOTE). */
  kNote: string;
  qc: QcFlag[];
  /** Plain-language notes for a person (skipped readings, unassigned positions, fits that failed…). */
  warnings: string[];
}
