import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import { temperaturePointsQuerySchema, temperaturesQuerySchema } from '../contracts/temperatures';
import type { TemperaturesService } from './temperatures.service';

/** K across temperatures per chemical system: every signed-in role. */
export function temperaturesRouter(temperatures: TemperaturesService): Router {
  const router = Router();
  router.use(requireRole('admin', 'lab_manager', 'scientist'));
  router.get('/', async (req, res) => {
    const query = temperaturesQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await temperatures.systems({ includeUnapproved: query.data.includeUnapproved === 'true' }));
  });
  /** One system's batches, a page at a time. */
  router.get('/points', async (req, res) => {
    const query = temperaturePointsQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(
      await temperatures.points({
        ...query.data,
        includeUnapproved: query.data.includeUnapproved === 'true',
      }),
    );
  });
  return router;
}
