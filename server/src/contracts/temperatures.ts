import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { vantHoffResultSchema } from './analysis-types';
import { pageOf } from './common';
import { batchStateSchema } from './enums';

/** GET /api/temperatures: approved batches only unless asked. */
export const temperaturesQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    includeUnapproved: z.enum(['true', 'false']).default('false'),
  }),
);

/** GET /api/temperatures/points: one system's batches, a page at a time (paged like the Intake list). */
export const temperaturePointsQuerySchema = /* @__PURE__ */ lazySchema(() =>
  temperaturesQuerySchema.extend({
    /** The chemical system, as batches name it. */
    system: z.string().trim().min(1).max(120),
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(200).default(25),
  }),
);
/** What a client may send (strings or numbers). */
export type TemperaturePointsQuery = z.input<typeof temperaturePointsQuerySchema>;

/** One batch's K at its temperature. */
export const temperaturePointSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    batchId: z.number(),
    batchName: z.string(),
    state: batchStateSchema,
    temperatureC: z.number(),
    model: z.string().nullable(),
    /** K of the batch's best candidate when it has a value (not for bounds or failed fits). */
    k: z.number().nullable(),
    kSe: z.number().nullable(),
    /** 95 % interval; an end is null when the data do not bound it. */
    kCi95: z.tuple([z.number().nullable(), z.number().nullable()]).nullable(),
    /** K as every screen and report states it (a bound or a failed fit reads as such). */
    kText: z.string().nullable(),
    /** Why this batch is not in the fit, when it is not. */
    excludedBecause: z.string().nullable(),
  }),
);
export type TemperaturePoint = z.infer<typeof temperaturePointSchema>;

/** A page of one system's points, sorted by temperature, then batch id (oldest first). */
export const temperaturePointsPageSchema = /* @__PURE__ */ lazySchema(() =>
  pageOf(temperaturePointSchema).extend({
    page: z.number(),
    pageSize: z.number(),
  }),
);
export type TemperaturePointsPage = z.infer<typeof temperaturePointsPageSchema>;

/** The batches of one system at one temperature, and the K of those in the fit (for the chart). */
export const temperatureGroupSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    temperatureC: z.number(),
    /** Batches of the system at this temperature. */
    batches: z.number(),
    /** Of them, how many are in the van 't Hoff fit. */
    used: z.number(),
    /** exp(mean ln K) over the batches in the fit; null when none is. */
    kGeometricMean: z.number().nullable(),
    kMin: z.number().nullable(),
    kMax: z.number().nullable(),
  }),
);
export type TemperatureGroup = z.infer<typeof temperatureGroupSchema>;

/**
 * One chemical system's van 't Hoff fit over all its usable batches, and its batches grouped by
 * temperature; the batches themselves come a page at a time from GET /api/temperatures/points.
 */
export const systemTemperaturesSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    systemName: z.string(),
    /** The stoichiometry the fit uses: the one most batches found best. */
    model: z.string().nullable(),
    vantHoff: vantHoffResultSchema.nullable(),
    note: z.string(),
    counts: z.object({ batches: z.number(), used: z.number() }),
    /** By temperature, lowest first. */
    groups: z.array(temperatureGroupSchema),
  }),
);
export type SystemTemperatures = z.infer<typeof systemTemperaturesSchema>;
