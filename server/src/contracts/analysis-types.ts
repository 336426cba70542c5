import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import type {
  AnalysisSettings,
  BatchResult,
  KStatus,
  Reading,
  SampleDefinition,
  SpectralAnalysisResult,
  VantHoffResult,
  WaterPeakPathLengths,
} from '../analysis';
import { SAMPLE_ROLES } from '../analysis/types';

/**
 * The analysis module's own types as response schemas. Readings, samples and the van 't Hoff fit are
 * checked field by field; the large nested ones (BatchResult, AnalysisSettings) are typed with the
 * module's TypeScript types and checked only at their top level (`z.custom`): a full schema of every
 * result field would restate the module.
 */

const isObject = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object';

export const sampleRoleSchema = /* @__PURE__ */ lazySchema(() =>
  z.enum(SAMPLE_ROLES as [SampleDefinition['role'], ...SampleDefinition['role'][]]),
);

export const K_STATUSES = [
  'determined',
  'poorly-determined',
  'lower-bound',
  'upper-bound',
  'not-converged',
  'not-determined',
] as const satisfies readonly KStatus[];
export const kStatusSchema = /* @__PURE__ */ lazySchema(() => z.enum(K_STATUSES));

export const readingSchema: z.ZodType<Reading> = /* @__PURE__ */ lazySchema(() =>
  z.object({
    position: z.string(),
    wavelengthNm: z.number(),
    absorbance: z.number().nullable(),
    flag: z.enum(['saturated', 'missing']).optional(),
    readTime: z.string().optional(),
    temperatureC: z.number().optional(),
    replicate: z.number().optional(),
  }),
);

export const sampleDefinitionSchema: z.ZodType<SampleDefinition> = /* @__PURE__ */ lazySchema(() =>
  z.object({
    position: z.string(),
    sampleId: z.string(),
    role: sampleRoleSchema,
    concentrationM: z.number().optional(),
    dilutionFactor: z.number().optional(),
    stockAM: z.number().optional(),
    volumeAMl: z.number().optional(),
    stockBM: z.number().optional(),
    volumeBMl: z.number().optional(),
    totalVolumeMl: z.number().optional(),
    replicateGroup: z.string().optional(),
  }),
);

export const vantHoffResultSchema: z.ZodType<VantHoffResult> = /* @__PURE__ */ lazySchema(() =>
  z.object({
    n: z.number(),
    deltaHJPerMol: z.number(),
    deltaHSe: z.number().nullable(),
    deltaSJPerMolK: z.number(),
    deltaSSe: z.number().nullable(),
    slope: z.number(),
    intercept: z.number(),
    r2: z.number(),
  }),
);

/** The analysis module's result (checked at the top level: positions and QC flags are lists). */
export const batchResultSchema = /* @__PURE__ */ lazySchema(() =>
  z.custom<BatchResult>(
    (v) => isObject(v) && Array.isArray(v['positions']) && Array.isArray(v['qc']),
    'not an analysis result',
  ),
);

/** The settings as the analysis module took them. */
export const analysisSettingsSchema = /* @__PURE__ */ lazySchema(() =>
  z.custom<AnalysisSettings>(isObject, 'not analysis settings'),
);

/** The whole-spectrum analysis of a batch read at many wavelengths (checked at the top level). */
export const spectralResultSchema = /* @__PURE__ */ lazySchema(() =>
  z.custom<SpectralAnalysisResult>(isObject, 'not a spectral result'),
);

/** Each well's path length from the water peak (checked at the top level). */
export const waterPeakPathLengthsSchema = /* @__PURE__ */ lazySchema(() =>
  z.custom<WaterPeakPathLengths>(isObject, 'not path lengths'),
);
