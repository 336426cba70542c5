import { type RequestHandler, Router } from 'express';
import { AppError } from '../common/app-error';
import { idParam } from '../common/validate';
import type { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { bearerToken } from '../instruments/instrument-token';
import type { InstrumentsService } from '../instruments/instruments.service';
import type { User } from '../users/user.entity';
import type { WatchersService } from '../watchers/watchers.service';
import type { IngestService } from './ingest.service';
import { singleFileUpload } from './upload';

const UPLOAD_ROLES = new Set(['admin', 'lab_manager', 'scientist']);

/**
 * POST /api/ingest: one route for the watcher (instrument token) and a signed-in person's upload.
 * Who may send is decided before the body is read, so strangers cannot make the server buffer files.
 */
export function ingestRouter(
  ingest: IngestService,
  instruments: InstrumentsService,
  maxBytes: number,
  watchers?: WatchersService,
): Router {
  const router = Router();

  const authenticateSender: RequestHandler = async (req, res, next) => {
    if (
      req.headers.authorization !== undefined &&
      watchers &&
      /^Bearer\s+eqw_/.test(req.headers.authorization)
    ) {
      // A watcher credential: it may send for any active profile, named by the form field "folder".
      const caller = await watchers.authenticate(req.headers.authorization);
      if (caller?.kind !== 'watcher')
        return next(AppError.unauthorized('The watcher credential is not valid or was revoked.'));
      res.locals['watcher'] = caller.credential;
      return next();
    }
    if (req.headers.authorization !== undefined) {
      const token = bearerToken(req.headers.authorization);
      const profile = token ? await instruments.findByToken(token) : undefined;
      if (!profile)
        return next(
          AppError.unauthorized(
            'The instrument token is not valid, was revoked, or its profile is inactive.',
          ),
        );
      res.locals['instrument'] = profile;
      return next();
    }
    const user = req.user as User | undefined;
    if (!user) return next(AppError.unauthorized());
    if (!UPLOAD_ROLES.has(user.role)) return next(AppError.forbidden());
    next();
  };

  router.post('/', authenticateSender, singleFileUpload(maxBytes), async (req, res) => {
    if (!req.file) throw AppError.badRequest('Send the export in a multipart form field named "file".');
    let profile = res.locals['instrument'] as InstrumentProfile | undefined;
    if (!profile && res.locals['watcher'] && watchers) {
      profile = await watchers.activeProfileForFolder(req.body?.folder);
    } else if (!profile) {
      profile = await instruments.get(idParam(req.body?.profileId, 'Instrument profile'));
      if (!profile.active) throw AppError.conflict(`The instrument profile "${profile.name}" is inactive.`);
    }
    const sourcePath = typeof req.body?.sourcePath === 'string' ? req.body.sourcePath : undefined;
    const receipt = await ingest.receive({
      content: req.file.buffer,
      originalName: req.file.originalname,
      profile,
      source: res.locals['instrument'] || res.locals['watcher'] ? 'watcher' : 'upload',
      uploadedById: (req.user as User | undefined)?.id,
      sourcePath,
    });
    res.status(202).json(receipt);
  });

  return router;
}
