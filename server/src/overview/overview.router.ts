import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import type { OverviewService } from './overview.service';

export const OVERVIEW_ROLES = ['admin', 'lab_manager', 'scientist'] as const;

export const overviewQuerySchema = z.strictObject({
  /** Start of "today" as the browser sees it (local midnight, ISO 8601); UTC midnight if left out. */
  since: z.iso.datetime({ offset: true }).optional(),
});

/** The signed-in person's starting point: every role, each answer cut to what the role may see. */
export function overviewRouter(overview: OverviewService): Router {
  const router = Router();
  router.use(requireRole(...OVERVIEW_ROLES));
  router.get('/', async (req, res) => {
    const query = overviewQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    const now = new Date();
    const since = query.data.since
      ? new Date(query.data.since)
      : new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
    res.json(await overview.overview({ id: req.user!.id, role: req.user!.role }, since, now));
  });
  return router;
}
