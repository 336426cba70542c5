import { Router } from 'express';
import * as z from 'zod';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam } from '../common/validate';
import type { ReportsService } from './reports.service';

const csvQuerySchema = z.strictObject({ content: z.enum(['readings', 'results']).default('readings') });

/** Batch exports, mounted under /api/batches: everyone signed in may download them. */
export function reportsRouter(reports: ReportsService): Router {
  const router = Router();
  // Per route, not router.use: this router shares the /batches mount with the batches router.
  const EVERYONE = requireRole('admin', 'lab_manager', 'scientist');
  router.get('/:id/export.csv', EVERYONE, async (req, res) => {
    const id = idParam(req.params['id'], 'Batch');
    const query = csvQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    const csv = await reports.csv(id, query.data.content);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="batch-${id}-${query.data.content}.csv"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(csv);
  });
  router.get('/:id/report.pdf', EVERYONE, async (req, res) => {
    const id = idParam(req.params['id'], 'Batch');
    const pdf = await reports.pdf(id);
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `attachment; filename="batch-${id}-report.pdf"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(pdf);
  });
  router.get('/:id/report.xlsx', EVERYONE, async (req, res) => {
    const id = idParam(req.params['id'], 'Batch');
    const xlsx = await reports.xlsx(id);
    res.setHeader('Content-Type', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet');
    res.setHeader('Content-Disposition', `attachment; filename="batch-${id}-report.xlsx"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(xlsx);
  });
  return router;
}
