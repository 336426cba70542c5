import { z } from 'zod';
import { SAMPLE_ROLES } from '../analysis/types';

export const layoutPositionSchema = z.strictObject({
  position: z
    .string()
    .trim()
    .toUpperCase()
    .regex(
      /^(?:[A-P](?:[1-9]|1\d|2[0-4])|C[1-9]\d{0,2})$/,
      'must be a well such as A1…P24 or a cuvette such as C1',
    ),
  role: z.enum(SAMPLE_ROLES as [string, ...string[]], {
    message: `must be one of ${SAMPLE_ROLES.join(', ')}`,
  }),
  replicateGroup: z.string().trim().min(1).max(60).optional(),
});
export type LayoutPosition = z.infer<typeof layoutPositionSchema>;

const positions = z.array(layoutPositionSchema).max(384);

export const createLayoutSchema = z
  .strictObject({
    name: z.string().trim().min(1, 'is required').max(120),
    format: z.enum(['96', '384', 'cuvette']),
    cuvetteCount: z.number().int().min(1).max(999).nullable().optional(),
    positions,
  })
  .refine((l) => l.format !== 'cuvette' || (l.cuvetteCount ?? 0) > 0, {
    message: 'a cuvette sequence needs cuvetteCount',
    path: ['cuvetteCount'],
  });
export type CreateLayoutInput = z.infer<typeof createLayoutSchema>;

export const updateLayoutSchema = z.strictObject({
  name: z.string().trim().min(1).max(120).optional(),
  cuvetteCount: z.number().int().min(1).max(999).nullable().optional(),
  positions,
  reason: z.string().trim().max(500).optional(),
});
export type UpdateLayoutInput = z.infer<typeof updateLayoutSchema>;
