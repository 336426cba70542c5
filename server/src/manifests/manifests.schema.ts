import { z } from 'zod';

const cell = z.union([z.string().max(200), z.number(), z.null()]).optional();

/** A manifest typed into the app: rows with the CSV's column names. */
export const manifestRowSchema = z.strictObject({
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
});
export type ManifestRowInput = z.infer<typeof manifestRowSchema>;

export const MANIFEST_COLUMNS = Object.keys(manifestRowSchema.shape) as (keyof ManifestRowInput)[];

const flag = z.union([z.boolean(), z.enum(['true', 'false']).transform((v) => v === 'true')]);

/** Fields besides the file or the rows; multipart forms send them as text. */
export const manifestMetaSchema = z.object({
  name: z.string().trim().min(1, 'is required').max(120).optional(),
  layoutId: z.coerce.number().int().positive({ message: 'is required' }),
  acceptMismatches: flag.optional(),
  reason: z.string().trim().max(500).optional(),
  rows: z.array(manifestRowSchema).max(2000).optional(),
});
export type ManifestMetaInput = z.infer<typeof manifestMetaSchema>;
