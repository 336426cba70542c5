import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam, validateBody } from '../common/validate';
import { createWebhookSchema, deliveriesQuerySchema, updateWebhookSchema } from '../contracts/webhooks';
import type { WebhooksService } from './webhooks.service';

/** `/api/webhooks`: receivers, their delivery log and sending again. Admins only. */
export function webhooksRouter(webhooks: WebhooksService): Router {
  const router = Router();
  router.use(requireRole('admin'));

  router.get('/', async (_req, res) => {
    res.json(await webhooks.list());
  });

  router.post('/', validateBody(createWebhookSchema), async (req, res) => {
    res.status(201).json(await webhooks.create(req.body, req.user!));
  });

  router.get('/deliveries', async (req, res) => {
    const query = deliveriesQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await webhooks.deliveries(query.data));
  });

  router.get('/deliveries/:id', async (req, res) => {
    res.json(await webhooks.getDelivery(idParam(req.params['id'], 'Delivery')));
  });

  router.post('/deliveries/:id/resend', async (req, res) => {
    res.status(202).json(await webhooks.resend(idParam(req.params['id'], 'Delivery'), req.user!));
  });

  router.get('/:id', async (req, res) => {
    res.json(await webhooks.get(idParam(req.params['id'], 'Webhook')));
  });

  router.patch('/:id', validateBody(updateWebhookSchema), async (req, res) => {
    res.json(await webhooks.update(idParam(req.params['id'], 'Webhook'), req.body, req.user!));
  });

  router.delete('/:id', async (req, res) => {
    await webhooks.remove(idParam(req.params['id'], 'Webhook'), req.user!);
    res.status(204).end();
  });

  return router;
}
