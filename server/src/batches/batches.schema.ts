import { z } from 'zod';
import { MAX_MONTE_CARLO_DRAWS } from '../workers/limits';

const position = z
  .string()
  .trim()
  .toUpperCase()
  .regex(
    /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/,
    'must be a well such as A1 or a cuvette such as C1',
  );

/** Each setting a person may give, checked, without defaults (a change names only what it changes). */
const settingFields = {
  wavelengthNm: z.number().min(100).max(3300).nullable(),
  pathLengthCm: z.number().positive().max(100),
  candidates: z
    .array(z.string().regex(/^[1-4]:[1-4]$/, 'must look like 1:1, 1:2, 2:1 …'))
    .min(1)
    .max(8),
  calibrationModel: z.enum(['linear', 'through-origin']),
  linearRangeMaxAbsorbance: z.number().positive().max(10),
  r2Min: z.number().min(0).max(1),
  replicateCvMax: z.number().positive().max(1),
  kCvMax: z.number().positive().max(10),
  epsilonLPerMolCm: z.number().positive().nullable(),
  monteCarloDraws: z.number().int().min(0).max(MAX_MONTE_CARLO_DRAWS),
  /** Fit a constant absorbance with K and ε (a reactant held at constant concentration absorbs too). */
  fitBaseline: z.boolean(),
  exclusions: z
    .array(z.strictObject({ position, reason: z.string().trim().min(3, 'give a reason').max(500) }))
    .max(384),
};

/** Where epsilonLPerMolCm came from when it was taken from another batch's calibration (set by the server). */
const epsilonSourceSchema = z.strictObject({
  batchId: z.number().int().positive(),
  batchName: z.string(),
  /** The approval record it was read from; null when that batch was not approved (its analysis at `takenAt`). */
  recordId: z.number().int().positive().nullable(),
  wavelengthNm: z.number().nullable(),
  epsilonLPerMolCm: z.number().positive(),
  takenAt: z.string(),
});

/** The analysis settings a batch keeps (a checked subset of the analysis module's AnalysisSettings). */
export const batchSettingsSchema = z.strictObject({
  wavelengthNm: settingFields.wavelengthNm.default(null),
  pathLengthCm: settingFields.pathLengthCm.default(1),
  candidates: settingFields.candidates.default(['1:1', '1:2', '2:1', '1:3']),
  calibrationModel: settingFields.calibrationModel.default('linear'),
  linearRangeMaxAbsorbance: settingFields.linearRangeMaxAbsorbance.default(1),
  r2Min: settingFields.r2Min.default(0.995),
  replicateCvMax: settingFields.replicateCvMax.default(0.05),
  kCvMax: settingFields.kCvMax.default(0.15),
  epsilonLPerMolCm: settingFields.epsilonLPerMolCm.default(null),
  epsilonSource: epsilonSourceSchema.nullable().default(null),
  // Stored settings from before the per-request cap may hold up to 20 000 draws; the analysis caps them.
  monteCarloDraws: z.number().int().min(0).max(20000).default(0),
  exclusions: settingFields.exclusions.default([]),
  fitBaseline: settingFields.fitBaseline.default(false),
});
export type BatchSettings = z.infer<typeof batchSettingsSchema>;
export type EpsilonSource = NonNullable<BatchSettings['epsilonSource']>;

/**
 * Settings a person may send: each optional and without a default, so a change keeps every setting it
 * does not name; never the ε source, which the server fills in itself.
 */
const settingsInputSchema = z.strictObject(settingFields).partial();

export const createBatchSchema = z.strictObject({
  name: z.string().trim().min(1, 'is required').max(120),
  profileId: z.number().int().positive(),
  layoutId: z.number().int().positive(),
  layoutVersion: z.number().int().positive().optional(),
  manifestId: z.number().int().positive(),
  manifestVersion: z.number().int().positive().optional(),
  runId: z.string().trim().min(1, 'is required').max(120),
  expectedFiles: z.number().int().min(1).max(1000).default(1),
  systemName: z.string().trim().max(120).nullable().optional(),
  temperatureC: z.number().min(-80).max(200).nullable().optional(),
  settings: settingsInputSchema.default({}),
});
export type CreateBatchInput = z.infer<typeof createBatchSchema>;

export const settingsChangeSchema = settingsInputSchema
  .extend({
    /** Take ε of the complex from this batch's calibration (same system, wavelength within ±1 nm). */
    epsilonFromBatchId: z.number().int().positive().optional(),
  })
  .refine((s) => s.epsilonFromBatchId === undefined || s.epsilonLPerMolCm === undefined, {
    message: 'give ε either from another batch or as a value, not both',
    path: ['epsilonFromBatchId'],
  });
export type SettingsChange = z.infer<typeof settingsChangeSchema>;

export const updateSettingsSchema = z.strictObject({
  settings: settingsChangeSchema,
  reason: z.string().trim().min(3, 'give a reason').max(500),
});

export const approveSchema = z.strictObject({ comment: z.string().trim().min(3, 'is required').max(2000) });
export const reasonSchema = z.strictObject({ reason: z.string().trim().min(3, 'is required').max(2000) });
export const assignSchema = z.strictObject({ batchId: z.number().int().positive() });

export const analysisQuerySchema = z.strictObject({
  /** For an approved batch: also analyse with today's engine and say whether the headline differs. */
  engineCheck: z.enum(['true', 'false']).optional(),
});
