import { z } from 'zod';

/** GET /api/overview: the start of "today" as the browser sees it. */
export const overviewQuerySchema = z.strictObject({
  /** Start of "today" as the browser sees it (local midnight, ISO 8601); UTC midnight if left out. */
  since: z.iso.datetime({ offset: true }).optional(),
});
