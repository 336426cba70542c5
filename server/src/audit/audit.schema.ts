import { z } from 'zod';

export const auditQuerySchema = z.strictObject({
  entity: z
    .enum(['layout', 'manifest', 'batch', 'instrument_profile', 'user', 'intake_file', 'webhook', 'watcher'])
    .optional(),
  entityId: z.coerce.number().int().positive().optional(),
  actorId: z.coerce.number().int().positive().optional(),
  action: z.string().trim().max(30).optional(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
  q: z.string().trim().max(200).optional(),
  page: z.coerce.number().int().min(0).default(0),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
});
