import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues } from '../common/validate';
import { auditQuerySchema } from '../contracts/audit';
import type { AuditService } from './audit.service';

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
