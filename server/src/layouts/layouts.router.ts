import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { idParam, validateBody } from '../common/validate';
import { createLayoutSchema, updateLayoutSchema } from '../contracts/layouts';
import type { LayoutsService } from './layouts.service';

const READERS = requireRole('admin', 'lab_manager', 'scientist');
const EDITORS = requireRole('admin', 'lab_manager');

/** Layouts: everyone signed in reads them; lab managers and admins edit them. */
export function layoutsRouter(layouts: LayoutsService): Router {
  const router = Router();
  router.get('/', READERS, async (_req, res) => {
    res.json(await layouts.list());
  });
  router.get('/:id', READERS, async (req, res) => {
    res.json(await layouts.get(idParam(req.params['id'], 'Layout')));
  });
  router.get('/:id/versions/:version', READERS, async (req, res) => {
    res.json(
      await layouts.get(idParam(req.params['id'], 'Layout'), idParam(req.params['version'], 'Version')),
    );
  });
  router.post('/', EDITORS, validateBody(createLayoutSchema), async (req, res) => {
    res.status(201).json(await layouts.create(req.body, req.user!));
  });
  router.put('/:id', EDITORS, validateBody(updateLayoutSchema), async (req, res) => {
    res.json(await layouts.update(idParam(req.params['id'], 'Layout'), req.body, req.user!));
  });
  return router;
}
