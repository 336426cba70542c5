import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { CONCENTRATION_UNITS } from '../analysis/concentration-units';
import { ANALYSIS_DEFAULTS } from '../analysis/options';
import {
  CALIBRATION_MODELS,
  DECIMAL_MARKS,
  DELIMITERS,
  JCAMP_POSITION_SOURCES,
  TEXT_ENCODINGS,
} from './enums';

/** An analysis draws at most this many Monte Carlo samples (about 0.4 s of one worker thread). */
export const MAX_MONTE_CARLO_DRAWS = 5000;

// ---------------------------------------------------------------------------------------------------
// Parsing rules of an instrument profile: the one place their defaults are written.

const columnName = /* @__PURE__ */ lazySchema(() => z.string().trim().min(1).max(60));

/** The default column names of a long table (matched case-insensitively). */
export const DEFAULT_COLUMN_NAMES = Object.freeze({
  position: 'position',
  wavelength: 'wavelength_nm',
  absorbance: 'absorbance',
  readTime: 'read_time',
  temperature: 'temperature_c',
  replicate: 'replicate',
});

/** How one profile's files are read; every field has its default. */
export const rulesSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    /** `auto` picks among `,` `;` and tab from the first lines of the file. */
    delimiter: z.enum(DELIMITERS).default('auto'),
    decimalMark: z.enum(DECIMAL_MARKS).default('.'),
    encoding: z.enum(TEXT_ENCODINGS).default('utf-8'),
    /** Lines to skip before the header row or the first key line. */
    skipLines: z.number().int().min(0).max(1000).default(0),
    columns: z
      .strictObject({
        position: columnName.default(DEFAULT_COLUMN_NAMES.position),
        wavelength: columnName.default(DEFAULT_COLUMN_NAMES.wavelength),
        absorbance: columnName.default(DEFAULT_COLUMN_NAMES.absorbance),
        readTime: columnName.default(DEFAULT_COLUMN_NAMES.readTime),
        temperature: columnName.default(DEFAULT_COLUMN_NAMES.temperature),
        replicate: columnName.default(DEFAULT_COLUMN_NAMES.replicate),
      })
      .default({ ...DEFAULT_COLUMN_NAMES }),
    spectrumWavelengthColumn: columnName.default(DEFAULT_COLUMN_NAMES.wavelength),
    /** JCAMP-DX files: a block's position is read from its title or its sample description. */
    jcampPositionFrom: z.enum(JCAMP_POSITION_SOURCES).default('title'),
  }),
);
export type ParsingRules = z.infer<typeof rulesSchema>;
export type ColumnNames = ParsingRules['columns'];

/** The parsing rules a new profile starts with. */
export const DEFAULT_PARSING_RULES: ParsingRules = /* @__PURE__ */ lazySchema(() =>
  Object.freeze(rulesSchema.parse({})),
);

// ---------------------------------------------------------------------------------------------------
// Analysis settings of a batch: a checked subset of the analysis module's AnalysisSettings, whose
// defaults (ANALYSIS_DEFAULTS) they take.

const position = /* @__PURE__ */ lazySchema(() =>
  z
    .string()
    .trim()
    .toUpperCase()
    .regex(
      /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/,
      'must be a well such as A1 or a cuvette such as C1',
    ),
);

/** Each setting a person may give, checked, without defaults (a change names only what it changes). */
export const settingFields = /* @__PURE__ */ lazySchema(() => ({
  wavelengthNm: z.number().min(100).max(3300).nullable(),
  pathLengthCm: z.number().positive().max(100),
  candidates: z
    .array(z.string().regex(/^[1-4]:[1-4]$/, 'must look like 1:1, 1:2, 2:1 …'))
    .min(1)
    .max(8),
  calibrationModel: z.enum(CALIBRATION_MODELS),
  linearRangeMaxAbsorbance: z.number().positive().max(10),
  r2Min: z.number().min(0).max(1),
  /** Fraction (0.05 = 5 %). */
  replicateCvMax: z.number().positive().max(1),
  /** Fraction (0.15 = 15 %). */
  kCvMax: z.number().positive().max(10),
  epsilonLPerMolCm: z.number().positive().nullable(),
  monteCarloDraws: z.number().int().min(0).max(MAX_MONTE_CARLO_DRAWS),
  /** Fit a constant absorbance with K and ε (a reactant held at constant concentration absorbs too). */
  fitBaseline: z.boolean(),
  exclusions: z
    .array(z.strictObject({ position, reason: z.string().trim().min(3, 'give a reason').max(500) }))
    .max(384),
  /** The unit results are reported in; mass units need `molarMassGPerMol` (checked on the whole settings). */
  concentrationUnit: z.enum(CONCENTRATION_UNITS),
  /** Molar mass of the analyte, g/mol. */
  molarMassGPerMol: z.number().positive().max(1e7).nullable(),
  /** Acceptance limits of a control's recovery, % [low, high]. */
  recoveryLimitsPct: z
    .tuple([z.number().min(0).max(1000), z.number().min(0).max(1000)])
    .refine(([low, high]) => low < high, 'the low limit must be below the high one'),
}));

/** Which batch, and which of its approval records, lent ε of the complex (set by the server). */
export const epsilonSourceSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    batchId: z.number().int().positive(),
    batchName: z.string(),
    /** The approval record it was read from; null when that batch was not approved (its analysis at `takenAt`). */
    recordId: z.number().int().positive().nullable(),
    wavelengthNm: z.number().nullable(),
    epsilonLPerMolCm: z.number().positive(),
    takenAt: z.string(),
  }),
);
export type EpsilonSource = z.infer<typeof epsilonSourceSchema>;

/** The analysis settings a batch keeps, each with its default. */
export const batchSettingsSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    wavelengthNm: settingFields.wavelengthNm.default(null),
    pathLengthCm: settingFields.pathLengthCm.default(ANALYSIS_DEFAULTS.pathLengthCm),
    candidates: settingFields.candidates.default(() => [...ANALYSIS_DEFAULTS.candidates]),
    calibrationModel: settingFields.calibrationModel.default(ANALYSIS_DEFAULTS.calibrationModel),
    linearRangeMaxAbsorbance: settingFields.linearRangeMaxAbsorbance.default(
      ANALYSIS_DEFAULTS.linearRangeMaxAbsorbance,
    ),
    r2Min: settingFields.r2Min.default(ANALYSIS_DEFAULTS.r2Min),
    replicateCvMax: settingFields.replicateCvMax.default(ANALYSIS_DEFAULTS.replicateCvMax),
    kCvMax: settingFields.kCvMax.default(ANALYSIS_DEFAULTS.kCvMax),
    epsilonLPerMolCm: settingFields.epsilonLPerMolCm.default(null),
    /** Set by the server when ε was taken from another batch's calibration. */
    epsilonSource: epsilonSourceSchema.nullable().default(null),
    // Stored settings from before the per-request cap may hold up to 20 000 draws; the analysis caps them.
    monteCarloDraws: z.number().int().min(0).max(20000).default(0),
    exclusions: settingFields.exclusions.default(() => []),
    fitBaseline: settingFields.fitBaseline.default(ANALYSIS_DEFAULTS.fitBaseline),
    concentrationUnit: settingFields.concentrationUnit.default(ANALYSIS_DEFAULTS.concentrationUnit),
    molarMassGPerMol: settingFields.molarMassGPerMol.default(null),
    recoveryLimitsPct: settingFields.recoveryLimitsPct.default((): [number, number] => [
      ...ANALYSIS_DEFAULTS.recoveryLimitsPct,
    ]),
  }),
);
export type BatchSettings = z.infer<typeof batchSettingsSchema>;

/** The settings of a batch when none are given: what the batch form shows. */
export const DEFAULT_BATCH_SETTINGS: BatchSettings = /* @__PURE__ */ lazySchema(() =>
  Object.freeze(batchSettingsSchema.parse({})),
);

/** Candidate stoichiometries offered for a batch, "A:B". */
export const CANDIDATE_STOICHIOMETRIES = ['1:1', '1:2', '2:1', '1:3', '3:1', '2:2', '1:4', '4:1'] as const;
