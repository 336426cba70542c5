import { pipeline } from 'node:stream';
import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam, validateBody } from '../common/validate';
import { assignSchema } from '../contracts/batches';
import type { BatchesService } from '../batches/batches.service';
import type { Role } from '../users/user.entity';
import type { IngestService } from './ingest.service';
import { intakeQuerySchema } from '../contracts/intake';

/** Who sees received files, their states and quarantine messages (also over live events). */
export const INTAKE_ROLES: readonly Role[] = ['admin', 'lab_manager'];

/** The Intake list: received files and their states. Lab managers and admins. */
export function intakeRouter(ingest: IngestService, batches: BatchesService): Router {
  const router = Router();
  router.use(requireRole(...INTAKE_ROLES));

  router.get('/', async (req, res) => {
    const query = intakeQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await ingest.list(query.data));
  });

  /** The raw archived bytes, by SHA-256, as a download under the sender's (cleaned) file name. */
  router.get('/raw/:sha256', async (req, res) => {
    const sha256 = String(req.params['sha256'] ?? '').toLowerCase();
    const raw = await ingest.raw(sha256);
    res.setHeader('Content-Type', 'application/octet-stream');
    res.setHeader('Content-Length', String(raw.size));
    res.setHeader('X-Content-SHA256', sha256);
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.attachment(raw.fileName);
    // An archive error mid-way cuts the answer short; a client that leaves releases the archive's stream.
    pipeline(raw.stream, res, () => undefined);
  });

  router.get('/:id', async (req, res) => {
    res.json(await ingest.getDto(idParam(req.params['id'], 'Received file')));
  });

  router.post('/:id/requeue', async (req, res) => {
    res.status(202).json(await ingest.requeue(idParam(req.params['id'], 'Received file')));
  });

  /** Put an unassigned file into a batch. */
  router.post('/:id/assign', validateBody(assignSchema), async (req, res) => {
    const id = idParam(req.params['id'], 'Received file');
    await batches.assignFile(id, req.body.batchId, req.user!);
    res.json(await ingest.getDto(id));
  });

  return router;
}
