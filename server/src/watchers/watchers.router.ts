import { type RequestHandler, Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { idParam, validateBody } from '../common/validate';
import { INTAKE_ROLES } from '../ingest/intake.router';
import { createWatcherSchema, heartbeatSchema } from '../contracts/watchers';
import type { WatcherCaller, WatchersService } from './watchers.service';

/** Watcher credentials (admins) and where watchers stand (admins and lab managers). */
export function watchersRouter(watchers: WatchersService): Router {
  const router = Router();
  router.get('/presence', requireRole(...INTAKE_ROLES), async (_req, res) => {
    res.json(await watchers.presenceList());
  });
  router.get('/', requireRole('admin'), async (_req, res) => {
    res.json(await watchers.list());
  });
  router.post('/', requireRole('admin'), validateBody(createWatcherSchema), async (req, res) => {
    res.status(201).json(await watchers.create(req.body.name, req.user!));
  });
  router.delete('/:id', requireRole('admin'), async (req, res) => {
    res.json(await watchers.revoke(idParam(req.params['id'], 'Watcher credential'), req.user!));
  });
  return router;
}

/**
 * The drop-folder watcher's own calls (Bearer watcher credential `eqw_…`; heartbeats and file states
 * also with an instrument token `eqt_…`). No session, no role: the token is the identity.
 */
export function watcherApiRouter(watchers: WatchersService): Router {
  const router = Router();
  const caller =
    (allowInstrument: boolean): RequestHandler =>
    async (req, res, next) => {
      const who = await watchers.authenticate(req.headers.authorization);
      if (!who || (!allowInstrument && who.kind !== 'watcher'))
        return next(
          AppError.unauthorized(
            allowInstrument
              ? 'Send a watcher credential (eqw_…) or an instrument token (eqt_…) as Bearer token.'
              : 'Send a watcher credential (eqw_…) as Bearer token; it may have been revoked.',
          ),
        );
      res.locals['caller'] = who;
      next();
    };

  router.get('/folders', caller(false), async (_req, res) => {
    res.json(await watchers.watchedFolders());
  });

  router.post('/heartbeat', caller(true), validateBody(heartbeatSchema), async (req, res) => {
    res.json(await watchers.heartbeat(res.locals['caller'] as WatcherCaller, req.body));
  });

  router.get('/files/:id', caller(true), async (req, res) => {
    res.json(
      await watchers.fileStatus(
        res.locals['caller'] as WatcherCaller,
        idParam(req.params['id'], 'Received file'),
      ),
    );
  });
  return router;
}
