import { z } from 'zod';

const position = z
  .string()
  .trim()
  .toUpperCase()
  .regex(
    /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/,
    'must be a well such as A1 or a cuvette such as C1',
  );

/** The analysis settings a batch keeps (a checked subset of the analysis module's AnalysisSettings). */
export const batchSettingsSchema = z.strictObject({
  wavelengthNm: z.number().min(100).max(3300).nullable().default(null),
  pathLengthCm: z.number().positive().max(100).default(1),
  candidates: z
    .array(z.string().regex(/^[1-4]:[1-4]$/, 'must look like 1:1, 1:2, 2:1 …'))
    .min(1)
    .max(8)
    .default(['1:1', '1:2', '2:1', '1:3']),
  calibrationModel: z.enum(['linear', 'through-origin']).default('linear'),
  linearRangeMaxAbsorbance: z.number().positive().max(10).default(1),
  r2Min: z.number().min(0).max(1).default(0.995),
  replicateCvMax: z.number().positive().max(1).default(0.05),
  kCvMax: z.number().positive().max(10).default(0.15),
  epsilonLPerMolCm: z.number().positive().nullable().default(null),
  monteCarloDraws: z.number().int().min(0).max(20000).default(0),
  /** Fit a constant absorbance with K and ε (a reactant held at constant concentration absorbs too). */
  fitBaseline: z.boolean().default(false),
  exclusions: z
    .array(z.strictObject({ position, reason: z.string().trim().min(3, 'give a reason').max(500) }))
    .max(384)
    .default([]),
});
export type BatchSettings = z.infer<typeof batchSettingsSchema>;

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
  settings: batchSettingsSchema.partial().default({}),
});
export type CreateBatchInput = z.infer<typeof createBatchSchema>;

export const updateSettingsSchema = z.strictObject({
  settings: batchSettingsSchema.partial(),
  reason: z.string().trim().min(3, 'give a reason').max(500),
});

export const approveSchema = z.strictObject({ comment: z.string().trim().min(3, 'is required').max(2000) });
export const reasonSchema = z.strictObject({ reason: z.string().trim().min(3, 'is required').max(2000) });
export const assignSchema = z.strictObject({ batchId: z.number().int().positive() });
