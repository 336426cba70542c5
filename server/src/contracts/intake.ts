import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { pageOf } from './common';
import { INTAKE_SOURCES, INTAKE_STATUSES, intakeStatusSchema } from './enums';

/** GET /api/intake: filters, order and page. */
export const intakeQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    status: z.enum(INTAKE_STATUSES).optional(),
    profileId: z.coerce.number().int().positive().optional(),
    q: z.string().trim().max(200).optional(),
    sort: z
      .enum(['receivedAt', 'finishedAt', 'originalName', 'status', 'sizeBytes', 'readingCount'])
      .default('receivedAt'),
    dir: z.enum(['asc', 'desc']).default('desc'),
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(500).default(25),
  }),
);

// ---------------------------------------------------------------------------------------------------
// Responses

/** One received file as the API lists it. */
export const intakeFileSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    profileId: z.number().nullable(),
    profileName: z.string().nullable(),
    originalName: z.string(),
    sha256: z.string(),
    sizeBytes: z.number(),
    status: intakeStatusSchema,
    duplicateOfId: z.number().nullable(),
    error: z.string().nullable(),
    warnings: z.array(z.string()),
    runId: z.string().nullable(),
    batchId: z.number().nullable(),
    readingCount: z.number(),
    source: z.enum(INTAKE_SOURCES),
    receivedAt: z.string(),
    finishedAt: z.string().nullable(),
  }),
);
export type IntakeFileDto = z.infer<typeof intakeFileSchema>;
export const intakePageSchema = /* @__PURE__ */ lazySchema(() => pageOf(intakeFileSchema));
export type IntakePage = z.infer<typeof intakePageSchema>;

/** What POST /api/ingest answers at once (202): the file is queued, or known already. */
export const ingestReceiptSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    status: z.enum(['queued', 'duplicate']),
    duplicateOfId: z.number().optional(),
  }),
);
export type IngestReceipt = z.infer<typeof ingestReceiptSchema>;
export type IntakeQuery = z.input<typeof intakeQuerySchema>;
