import * as z from 'zod';
import { vantHoffResultSchema } from './analysis-types';
import { batchStateSchema } from './enums';

/** GET /api/temperatures: approved batches only unless asked. */
export const temperaturesQuerySchema = z.strictObject({
  includeUnapproved: z.enum(['true', 'false']).default('false'),
});

/** One batch's K at its temperature. */
export const temperaturePointSchema = z.object({
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
});
export type TemperaturePoint = z.infer<typeof temperaturePointSchema>;

/** One chemical system's K across batches and its van 't Hoff fit. */
export const systemTemperaturesSchema = z.object({
  systemName: z.string(),
  /** The stoichiometry the fit uses: the one most batches found best. */
  model: z.string().nullable(),
  points: z.array(temperaturePointSchema),
  vantHoff: vantHoffResultSchema.nullable(),
  note: z.string(),
});
export type SystemTemperatures = z.infer<typeof systemTemperaturesSchema>;
