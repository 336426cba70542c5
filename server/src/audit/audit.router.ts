import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import type { AuditService } from './audit.service';

const auditQuerySchema = z.strictObject({
  entity: z.enum(['layout', 'manifest', 'batch', 'instrument_profile', 'user', 'intake_file']).optional(),
  entityId: z.coerce.number().int().positive().optional(),
  actorId: z.coerce.number().int().positive().optional(),
  action: z.string().trim().max(30).optional(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
  q: z.string().trim().max(200).optional(),
  page: z.coerce.number().int().min(0).default(0),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
});

/** Read-only: the app offers no way to edit or delete an entry. */
export function auditRouter(audit: AuditService): Router {
  const router = Router();
  router.use(requireRole('admin', 'lab_manager'));
  router.get('/', async (req, res) => {
    const query = auditQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await audit.list(query.data));
  });
  return router;
}
