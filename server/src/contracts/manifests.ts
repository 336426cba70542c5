import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { sampleDefinitionSchema } from './analysis-types';
import { MANIFEST_SOURCES } from './enums';

const cell = /* @__PURE__ */ lazySchema(() =>
  z.union([z.string().max(200), z.number(), z.null()]).optional(),
);

/** A manifest typed into the app: rows with the CSV's column names. */
export const manifestRowSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    position: cell,
    sample_id: cell,
    role: cell,
    concentration_M: cell,
    dilution_factor: cell,
    stock_a_M: cell,
    volume_a_mL: cell,
    stock_b_M: cell,
    volume_b_mL: cell,
    total_volume_mL: cell,
    replicate_group: cell,
  }),
);
export type ManifestRowInput = z.infer<typeof manifestRowSchema>;

export const MANIFEST_COLUMNS = Object.keys(manifestRowSchema.shape) as (keyof ManifestRowInput)[];

const flag = /* @__PURE__ */ lazySchema(() =>
  z.union([z.boolean(), z.enum(['true', 'false']).transform((v) => v === 'true')]),
);

/** Fields besides the file or the rows; multipart forms send them as text. */
export const manifestMetaSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    name: z.string().trim().min(1, 'is required').max(120).optional(),
    layoutId: z.coerce.number().int().positive({ message: 'is required' }),
    acceptMismatches: flag.optional(),
    reason: z.string().trim().max(500).optional(),
    rows: z.array(manifestRowSchema).max(2000).optional(),
  }),
);
export type ManifestMetaInput = z.infer<typeof manifestMetaSchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

/** One thing wrong with a manifest; `row` is the line in the file, the header being row 1. */
export const manifestProblemSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ row: z.number(), column: z.string(), message: z.string() }),
);
export type ManifestProblem = z.infer<typeof manifestProblemSchema>;
export const manifestMismatchSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ position: z.string(), message: z.string() }),
);
export type ManifestMismatch = z.infer<typeof manifestMismatchSchema>;
const manifestSource = /* @__PURE__ */ lazySchema(() => z.enum(MANIFEST_SOURCES));

/** POST /api/manifests/check: the samples, every problem, and mismatches with the layout. */
export const manifestCheckSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    source: manifestSource,
    fileName: z.string().nullable(),
    layoutId: z.number(),
    layoutVersion: z.number(),
    samples: z.array(sampleDefinitionSchema),
    problems: z.array(manifestProblemSchema),
    mismatches: z.array(manifestMismatchSchema),
  }),
);
export type ManifestCheck = z.infer<typeof manifestCheckSchema>;

export const manifestVersionInfoSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    version: z.number(),
    createdAt: z.string(),
    createdById: z.number().nullable(),
    source: z.string(),
  }),
);
export type ManifestVersionInfo = z.infer<typeof manifestVersionInfoSchema>;

/** A manifest at one version, with the list of its versions. */
export const manifestSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    layoutId: z.number(),
    layoutVersion: z.number(),
    currentVersion: z.number(),
    version: z.number(),
    source: manifestSource,
    fileName: z.string().nullable(),
    samples: z.array(sampleDefinitionSchema),
    versions: z.array(manifestVersionInfoSchema),
    updatedAt: z.string(),
  }),
);
export type ManifestDto = z.infer<typeof manifestSchema>;

/** GET /api/manifests lists these. */
export const manifestSummarySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    layoutId: z.number(),
    currentVersion: z.number(),
    sampleCount: z.number(),
    updatedAt: z.string(),
  }),
);
export type ManifestSummaryDto = z.infer<typeof manifestSummarySchema>;
