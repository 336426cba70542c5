import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { batchStateSchema, roleSchema } from './enums';

/** GET /api/overview: the start of "today" as the browser sees it. */
export const overviewQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    /** Start of "today" as the browser sees it (local midnight, ISO 8601); UTC midnight if left out. */
    since: z.iso.datetime({ offset: true }).optional(),
  }),
);

/** QC of a batch as far as it is known without running an analysis. */
export const overviewQcSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    /** `known`: worked out already (the batches list or batch page ran it); `not-analysed`: not yet, open the batch. */
    state: z.enum(['known', 'not-analysed', 'no-files']),
    flagCount: z.number().nullable(),
    errorCount: z.number().nullable(),
  }),
);
export type OverviewQc = z.infer<typeof overviewQcSchema>;

export const overviewBatchSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    state: batchStateSchema,
    profileName: z.string().nullable(),
    expectedFiles: z.number(),
    storedFiles: z.number(),
    readingCount: z.number(),
    lastActivityAt: z.string(),
    qc: overviewQcSchema,
  }),
);
export type OverviewBatch = z.infer<typeof overviewBatchSchema>;

/** A batch this person may take the next step on: `review` an open batch with all its files, `approve` a reviewed one. */
export const overviewReviewItemSchema = /* @__PURE__ */ lazySchema(() =>
  overviewBatchSchema.extend({ action: z.enum(['review', 'approve']) }),
);
export type OverviewReviewItem = z.infer<typeof overviewReviewItemSchema>;

export const overviewQuarantinedFileSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    originalName: z.string(),
    profileName: z.string().nullable(),
    receivedAt: z.string(),
    error: z.string().nullable(),
  }),
);
export type OverviewQuarantinedFile = z.infer<typeof overviewQuarantinedFileSchema>;

export const overviewSilentInstrumentSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    /** When the instrument last sent anything; null if never. */
    lastSeenAt: z.string().nullable(),
  }),
);
export type OverviewSilentInstrument = z.infer<typeof overviewSilentInstrumentSchema>;

/** GET /api/overview: the starting point of the signed-in person, only what their role may see. */
export const overviewSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    role: roleSchema,
    generatedAt: z.string(),
    openBatches: z.object({ total: z.number(), items: z.array(overviewBatchSchema) }),
    awaitingMe: z.object({
      total: z.number(),
      items: z.array(overviewReviewItemSchema),
      fourEyes: z.boolean(),
    }),
    /** Lab managers and admins only (the roles of the intake). */
    quarantinedToday: z
      .object({ since: z.string(), count: z.number(), latest: z.array(overviewQuarantinedFileSchema) })
      .optional(),
    /** Lab managers and admins only: active instruments silent for longer than `silentAfterHours`. */
    silentInstruments: z
      .object({ silentAfterHours: z.number(), items: z.array(overviewSilentInstrumentSchema) })
      .optional(),
  }),
);
export type OverviewDto = z.infer<typeof overviewSchema>;
