import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import type { TemperaturesService } from './temperatures.service';

export const temperaturesQuerySchema = z.strictObject({
  includeUnapproved: z.enum(['true', 'false']).default('false'),
});

/** K across temperatures per chemical system: every signed-in role. */
export function temperaturesRouter(temperatures: TemperaturesService): Router {
  const router = Router();
  router.use(requireRole('admin', 'lab_manager', 'scientist'));
  router.get('/', async (req, res) => {
    const query = temperaturesQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await temperatures.systems({ includeUnapproved: query.data.includeUnapproved === 'true' }));
  });
  return router;
}
