import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam, validateBody } from '../common/validate';
import {
  analysisQuerySchema,
  approveSchema,
  batchListQuerySchema,
  createBatchSchema,
  reasonSchema,
  updateSettingsSchema,
} from '../contracts/batches';
import type { Role } from '../users/user.entity';
import type { BatchesService } from './batches.service';

/** Who reads batches (also their live events). */
export const BATCH_READER_ROLES: readonly Role[] = ['admin', 'lab_manager', 'scientist'];
const EVERYONE = requireRole(...BATCH_READER_ROLES);
const MANAGERS = requireRole('admin', 'lab_manager');

/**
 * Batches. Everyone signed in reads them; lab managers create them; scientists and lab managers change
 * analysis settings and mark them reviewed; only lab managers approve (with a comment) and reopen.
 */
export function batchesRouter(batches: BatchesService): Router {
  const router = Router();
  router.get('/', EVERYONE, async (req, res) => {
    const query = batchListQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await batches.list(query.data));
  });
  router.post('/', MANAGERS, validateBody(createBatchSchema), async (req, res) => {
    res.status(201).json(await batches.create(req.body, req.user!));
  });
  router.get('/:id', EVERYONE, async (req, res) => {
    res.json(await batches.get(idParam(req.params['id'], 'Batch')));
  });
  router.get('/:id/analysis', EVERYONE, async (req, res) => {
    const query = analysisQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(
      await batches.analysis(
        idParam(req.params['id'], 'Batch'),
        {},
        { engineCheck: query.data.engineCheck === 'true' },
      ),
    );
  });
  router.get('/:id/results', EVERYONE, async (req, res) => {
    res.json(await batches.results(idParam(req.params['id'], 'Batch')));
  });
  router.get('/:id/results/:recordId', EVERYONE, async (req, res) => {
    res.json(
      await batches.result(
        idParam(req.params['id'], 'Batch'),
        idParam(req.params['recordId'], 'Approval record'),
      ),
    );
  });
  router.get('/:id/epsilon-sources', EVERYONE, async (req, res) => {
    res.json(await batches.epsilonSources(idParam(req.params['id'], 'Batch')));
  });
  router.put(
    '/:id/settings',
    requireRole('lab_manager', 'scientist'),
    validateBody(updateSettingsSchema),
    async (req, res) => {
      res.json(
        await batches.updateSettings(
          idParam(req.params['id'], 'Batch'),
          req.body.settings,
          req.body.reason,
          req.user!,
        ),
      );
    },
  );
  router.post('/:id/review', requireRole('lab_manager', 'scientist'), async (req, res) => {
    res.json(await batches.review(idParam(req.params['id'], 'Batch'), req.user!));
  });
  router.post('/:id/approve', requireRole('lab_manager'), validateBody(approveSchema), async (req, res) => {
    res.json(await batches.approve(idParam(req.params['id'], 'Batch'), req.body.comment, req.user!));
  });
  router.post('/:id/reopen', requireRole('lab_manager'), validateBody(reasonSchema), async (req, res) => {
    res.json(await batches.reopen(idParam(req.params['id'], 'Batch'), req.body.reason, req.user!));
  });
  return router;
}
