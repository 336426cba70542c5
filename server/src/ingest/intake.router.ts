import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam } from '../common/validate';
import type { IngestService } from './ingest.service';
import { intakeQuerySchema } from './intake.schema';

/** The Intake list: received files and their states. Lab managers and admins. */
export function intakeRouter(ingest: IngestService): Router {
  const router = Router();
  router.use(requireRole('admin', 'lab_manager'));

  router.get('/', async (req, res) => {
    const query = intakeQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await ingest.list(query.data));
  });

  router.get('/:id', async (req, res) => {
    res.json(await ingest.getDto(idParam(req.params['id'], 'Received file')));
  });

  router.post('/:id/requeue', async (req, res) => {
    res.status(202).json(await ingest.requeue(idParam(req.params['id'], 'Received file')));
  });

  return router;
}
