import { z } from 'zod';

export const intakeQuerySchema = z.strictObject({
  status: z.enum(['queued', 'parsing', 'stored', 'duplicate', 'quarantined', 'unassigned']).optional(),
  profileId: z.coerce.number().int().positive().optional(),
  q: z.string().trim().max(200).optional(),
  sort: z
    .enum(['receivedAt', 'finishedAt', 'originalName', 'status', 'sizeBytes', 'readingCount'])
    .default('receivedAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(0).default(0),
  pageSize: z.coerce.number().int().min(1).max(500).default(25),
});
