import { Router } from 'express';
import { overviewQuerySchema } from '../contracts/overview';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import type { OverviewService } from './overview.service';

export const OVERVIEW_ROLES = ['admin', 'lab_manager', 'scientist'] as const;

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
