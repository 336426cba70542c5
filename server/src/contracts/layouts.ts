import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import type { SampleRole } from '../analysis/types';
import { PLATE_FORMATS, plateFormatSchema } from './enums';
import { SAMPLE_ROLES } from '../analysis/types';

export const layoutPositionSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    position: z
      .string()
      .trim()
      .toUpperCase()
      .regex(
        /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/,
        'must be a well such as A1…P24 or a cuvette such as C1',
      ),
    role: z.enum(SAMPLE_ROLES as [SampleRole, ...SampleRole[]], {
      message: `must be one of ${SAMPLE_ROLES.join(', ')}`,
    }),
    replicateGroup: z.string().trim().min(1).max(60).optional(),
  }),
);
export type LayoutPosition = z.infer<typeof layoutPositionSchema>;

const positions = /* @__PURE__ */ lazySchema(() => z.array(layoutPositionSchema).max(384));

export const createLayoutSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .strictObject({
      name: z.string().trim().min(1, 'is required').max(120),
      format: z.enum(PLATE_FORMATS),
      cuvetteCount: z.number().int().min(1).max(999).nullable().optional(),
      positions,
    })
    .refine((l) => l.format !== 'cuvette' || (l.cuvetteCount ?? 0) > 0, {
      message: 'a cuvette sequence needs cuvetteCount',
      path: ['cuvetteCount'],
    }),
);
export type CreateLayoutInput = z.infer<typeof createLayoutSchema>;

export const updateLayoutSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    name: z.string().trim().min(1).max(120).optional(),
    cuvetteCount: z.number().int().min(1).max(999).nullable().optional(),
    positions,
    reason: z.string().trim().max(500).optional(),
  }),
);
export type UpdateLayoutInput = z.infer<typeof updateLayoutSchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

const sampleRole = /* @__PURE__ */ lazySchema(() => z.enum(SAMPLE_ROLES as [SampleRole, ...SampleRole[]]));

/** GET /api/layouts lists these. */
export const layoutSummarySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    format: plateFormatSchema,
    cuvetteCount: z.number().nullable(),
    currentVersion: z.number(),
    positionCount: z.number(),
    roleCounts: z.partialRecord(sampleRole, z.number()),
    updatedAt: z.string(),
  }),
);
export type LayoutSummaryDto = z.infer<typeof layoutSummarySchema>;

/** A layout at one version, with the list of its versions. */
export const layoutSchema = /* @__PURE__ */ lazySchema(() =>
  layoutSummarySchema.extend({
    version: z.number(),
    positions: z.array(
      z.object({ position: z.string(), role: sampleRole, replicateGroup: z.string().optional() }),
    ),
    versions: z.array(
      z.object({ version: z.number(), createdAt: z.string(), createdById: z.number().nullable() }),
    ),
  }),
);
export type LayoutDto = z.infer<typeof layoutSchema>;
