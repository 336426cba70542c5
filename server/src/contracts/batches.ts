import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import {
  analysisSettingsSchema,
  batchResultSchema,
  kStatusSchema,
  readingSchema,
  sampleDefinitionSchema,
  spectralResultSchema,
  waterPeakPathLengthsSchema,
} from './analysis-types';
import { pageOf } from './common';
import { BATCH_STATES, batchStateSchema, intakeStatusSchema } from './enums';
import { batchSettingsSchema, settingFields } from './settings';

export { type BatchSettings, type EpsilonSource, batchSettingsSchema, epsilonSourceSchema } from './settings';

/**
 * Settings a person may send: each optional and without a default, so a change keeps every setting it
 * does not name; never the ε source, which the server fills in itself.
 */
const settingsInputSchema = /* @__PURE__ */ lazySchema(() => z.strictObject(settingFields).partial());

export const createBatchSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
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
  }),
);
export type CreateBatchInput = z.infer<typeof createBatchSchema>;
/** What a client sends to POST /api/batches (settings left out take the defaults). */
export type CreateBatchRequest = z.input<typeof createBatchSchema>;

export const settingsChangeSchema = /* @__PURE__ */ lazySchema(() =>
  settingsInputSchema
    .extend({
      /** Take ε of the complex from this batch's calibration (same system, wavelength within ±1 nm). */
      epsilonFromBatchId: z.number().int().positive().optional(),
    })
    .refine((s) => s.epsilonFromBatchId === undefined || s.epsilonLPerMolCm === undefined, {
      message: 'give ε either from another batch or as a value, not both',
      path: ['epsilonFromBatchId'],
    }),
);
export type SettingsChange = z.infer<typeof settingsChangeSchema>;

export const updateSettingsSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    settings: settingsChangeSchema,
    reason: z.string().trim().min(3, 'give a reason').max(500),
  }),
);

export const approveSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({ comment: z.string().trim().min(3, 'is required').max(2000) }),
);
export const reasonSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({ reason: z.string().trim().min(3, 'is required').max(2000) }),
);
export const assignSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({ batchId: z.number().int().positive() }),
);

export const analysisQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    /** For an approved batch: also analyse with today's engine and say whether the headline differs. */
    engineCheck: z.enum(['true', 'false']).optional(),
  }),
);

/** GET /api/batches: filters, order and page (paged like the Intake list). */
export const batchListQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    state: z.enum(BATCH_STATES).optional(),
    /** Only batches of this instrument profile. */
    profileId: z.coerce.number().int().positive().optional(),
    /** Not approved: open or reviewed (the batches a file may still join). */
    unapproved: z.enum(['true', 'false']).optional(),
    /** Part of a batch name, run id, sample id of its manifest, or name of one of its files. */
    q: z.string().trim().max(200).optional(),
    sort: z
      .enum(['lastActivityAt', 'createdAt', 'name', 'state', 'instrument', 'runId', 'files', 'qc', 'k'])
      .default('lastActivityAt'),
    dir: z.enum(['asc', 'desc']).default('desc'),
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(500).default(25),
  }),
);
/** What a client may send (strings or numbers). */
export type BatchListQuery = z.input<typeof batchListQuerySchema>;
/** The query as the server reads it, defaults filled in. */
export type BatchListParams = z.output<typeof batchListQuerySchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

const nullableNumber = /* @__PURE__ */ lazySchema(() => z.number().nullable());
const interval = /* @__PURE__ */ lazySchema(() => z.tuple([nullableNumber, nullableNumber]));

/** The headline of a batch's analysis, for lists: QC flags, the best stoichiometry and its K. */
export const batchResultSummarySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    qcFlagCount: z.number(),
    qcErrorCount: z.number(),
    best: z.string().nullable(),
    /** K of the best candidate when it has a value (not for bounds or failed fits). */
    k: nullableNumber,
    kSe: nullableNumber,
    /** 95 % interval; an end is null when the data do not bound it. */
    kCi95: interval.nullable(),
    /** What is known of K; null without a best candidate (or in a result stored before K had a status). */
    kStatus: kStatusSchema.nullable(),
    kLowerBound95: nullableNumber,
    kUpperBound95: nullableNumber,
    kUnit: z.string().nullable(),
    /** The K as every screen, report and mail states it (formatK). */
    kText: z.string().nullable(),
  }),
);
export type BatchResultSummary = z.infer<typeof batchResultSummarySchema>;

/** A batch as GET /api/batches and /api/batches/:id send it. */
export const batchSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    state: batchStateSchema,
    profileId: z.number(),
    profileName: z.string().nullable(),
    layoutId: z.number(),
    layoutName: z.string().nullable(),
    layoutVersion: z.number(),
    manifestId: z.number(),
    manifestName: z.string().nullable(),
    manifestVersion: z.number(),
    runId: z.string(),
    expectedFiles: z.number(),
    fileCount: z.number(),
    systemName: z.string().nullable(),
    temperatureC: nullableNumber,
    settings: batchSettingsSchema,
    createdAt: z.string(),
    updatedAt: z.string(),
    lastActivityAt: z.string(),
    reviewedBy: z.string().nullable(),
    reviewedAt: z.string().nullable(),
    approvedBy: z.string().nullable(),
    approvedAt: z.string().nullable(),
    approvalComment: z.string().nullable(),
    createdBy: z.string().nullable(),
    /** Null until a file has arrived. For an approved batch: the headline of its approval record. */
    summary: batchResultSummarySchema.nullable(),
  }),
);
export type BatchDto = z.infer<typeof batchSchema>;

/**
 * Where a batch's stored headline stands: `none` (no file yet), `pending` (its inputs changed and the
 * analysis is on its way; `summary` is the previous one, if any), `current`, `failed` (the analysis of
 * its current inputs fails; `summaryError` says why).
 */
export const SUMMARY_STATES = ['none', 'pending', 'current', 'failed'] as const;
export const summaryStateSchema = /* @__PURE__ */ lazySchema(() => z.enum(SUMMARY_STATES));
export type SummaryState = z.infer<typeof summaryStateSchema>;

/** One row of GET /api/batches: the batch and its stored headline, never an analysis on read. */
export const batchListItemSchema = /* @__PURE__ */ lazySchema(() =>
  batchSchema.extend({
    summaryState: summaryStateSchema,
    summaryError: z.string().nullable(),
  }),
);
export type BatchListItemDto = z.infer<typeof batchListItemSchema>;
export const batchPageSchema = /* @__PURE__ */ lazySchema(() => pageOf(batchListItemSchema));
export type BatchPage = z.infer<typeof batchPageSchema>;

/** One input file as an approval record names it. */
export const recordedFileSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    originalName: z.string(),
    sha256: z.string(),
    readingCount: z.number(),
    receivedAt: z.string(),
  }),
);
export type RecordedFile = z.infer<typeof recordedFileSchema>;

/** What one approval froze, without the result itself (GET /api/batches/:id/results lists these). */
export const approvalRecordSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    batchId: z.number(),
    schemaVersion: z.number(),
    engine: z.object({ version: z.string(), packageVersion: z.string(), sourceSha256: z.string() }),
    approvedBy: z.string().nullable(),
    approvedAt: z.string(),
    approvalComment: z.string(),
    settings: batchSettingsSchema,
    files: z.array(recordedFileSchema),
    /** The headline of the stored result. */
    summary: batchResultSummarySchema,
    /** Set when the batch was reopened after this approval; the record stays as it was. */
    supersededAt: z.string().nullable(),
    supersededBy: z.string().nullable(),
    supersededReason: z.string().nullable(),
  }),
);
export type ApprovalRecordDto = z.infer<typeof approvalRecordSchema>;

/** One approval record in full: also the settings as the analysis module took them, and the result. */
export const approvalRecordFullSchema = /* @__PURE__ */ lazySchema(() =>
  approvalRecordSchema.extend({
    analysisSettings: analysisSettingsSchema,
    result: batchResultSchema,
  }),
);
export type ApprovalRecordFullDto = z.infer<typeof approvalRecordFullSchema>;

/** Today's engine on an approved batch's inputs, compared with the approval record's headline. */
export const engineCheckSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    /** The engine this server runs. */
    engineVersion: z.string(),
    sameEngine: z.boolean(),
    /** True when best model, K, its interval or its status differ from the record. */
    differs: z.boolean(),
    /** False when the files stored now are not those the record names (by SHA-256): then the difference is not the engine's. */
    inputsMatch: z.boolean(),
    current: batchResultSummarySchema.nullable(),
    /** Why today's engine gave no result, when it failed. */
    error: z.string().nullable(),
  }),
);
export type EngineCheckDto = z.infer<typeof engineCheckSchema>;

/** A batch whose calibration may give ε of the complex to another batch. */
export const epsilonCandidateSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    batchId: z.number(),
    batchName: z.string(),
    state: batchStateSchema,
    temperatureC: nullableNumber,
    /** The approval record the value comes from (approved batches); null: the batch's analysis now. */
    recordId: nullableNumber,
    wavelengthNm: z.number(),
    epsilonLPerMolCm: z.number(),
    epsilonSe: z.number(),
  }),
);
export type EpsilonCandidateDto = z.infer<typeof epsilonCandidateSchema>;

/** GET /api/batches/:id/analysis: everything the analysis needs, so the browser can recompute what-if edits. */
export const batchAnalysisSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    batch: batchSchema,
    readings: z.array(readingSchema.and(z.object({ intakeFileId: z.number() }))),
    samples: z.array(sampleDefinitionSchema),
    layoutPositions: z.array(
      z.object({ position: z.string(), role: z.string(), replicateGroup: z.string().optional() }),
    ),
    files: z.array(recordedFileSchema.extend({ status: intakeStatusSchema })),
    /** The settings as the analysis module took them. */
    settings: analysisSettingsSchema,
    result: batchResultSchema,
    /** Approved batches: the approval record `result` comes from (null if approved before records were kept). */
    record: approvalRecordSchema.nullable(),
    /** Only when asked for, on an approved batch with a record. */
    engineCheck: engineCheckSchema.optional(),
    /** Every approval record of the batch, newest first (superseded ones included). */
    approvals: z.array(approvalRecordSchema),
    /** Plates read near 977 and 900 nm: each well's path length from the water peak; else null. */
    wellPathLengths: waterPeakPathLengthsSchema.nullable().optional(),
    /** Batches read at 10 or more wavelengths: the whole-spectrum analysis (null otherwise or on failure). */
    spectral: spectralResultSchema.nullable().optional(),
    spectralError: z.string().nullable().optional(),
  }),
);
export type BatchAnalysisDto = z.infer<typeof batchAnalysisSchema>;
