import { Router } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { requireRole, requireSignedIn } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam, validateBody } from '../common/validate';
import { emailKeyOf } from '../contracts/email-address';
import type { UsersService } from '../users/users.service';
import { RESET_PASSWORD_TTL_HOURS } from '../users/users.service';
import { passwordResetMail } from './mail-templates';
import type { MailService } from './mail.service';
import { forgotPasswordSchema, notificationSettingsSchema, outboxQuerySchema } from '../contracts/mail';
import type { NotificationsService } from './notifications.service';
import type { OutboxService } from './outbox.service';
import { inProcessCounts, type RateLimitStores } from '../redis/rate-limit-stores';

/** `/api/me/notifications`: every signed-in person reads and changes their own mail settings. */
export function notificationsRouter(notifications: NotificationsService): Router {
  const router = Router();
  router.use(requireSignedIn);
  router.get('/', async (req, res) => {
    res.json(await notifications.get(req.user!.id));
  });
  router.put('/', validateBody(notificationSettingsSchema), async (req, res) => {
    res.json(await notifications.update(req.user!.id, req.body));
  });
  return router;
}

/**
 * `/api/outbox`: the messages the local SMTP stand-in received (admins), and whether it runs (everyone
 * signed in, so the web app can hide the page).
 */
export function outboxRouter(outbox: OutboxService, standInRunning: () => boolean): Router {
  const router = Router();
  router.get('/status', requireSignedIn, (_req, res) => {
    res.json({ standIn: standInRunning() });
  });
  const ADMIN = requireRole('admin');
  const needStandIn = (): void => {
    if (!standInRunning())
      throw AppError.notFound('There is no outbox: the local mail stand-in is not running on this server.');
  };
  router.get('/', ADMIN, async (req, res) => {
    needStandIn();
    const query = outboxQuerySchema.safeParse(req.query);
    if (!query.success) throw AppError.badRequest(`Invalid query: ${describeIssues(query.error.issues)}`);
    res.json(await outbox.list(query.data.page, query.data.pageSize));
  });
  router.get('/:id', ADMIN, async (req, res) => {
    needStandIn();
    res.json(await outbox.get(idParam(req.params['id'], 'Message')));
  });
  return router;
}

/**
 * `POST /api/auth/forgot-password {email}`: always 202, whether or not the address belongs to anyone;
 * the one-time link goes out by mail in the background.
 */
export function forgotPasswordRouter(
  users: UsersService,
  mail: MailService,
  publicUrl: string,
  limits: { max: number; windowMs: number },
  log: (message: string, err?: unknown) => void,
  stores: RateLimitStores = inProcessCounts,
): Router {
  const router = Router();
  const accountStore = stores('reset-account');
  const addressStore = stores('reset-address');
  const tooMany = (): AppError =>
    new AppError('too_many_attempts', 429, 'Too many reset requests; wait a few minutes and try again.');
  // Per address and e-mail: a few tries for one account; per address: a bound on sweeping many accounts.
  const perAccount = rateLimit({
    ...(accountStore ? { store: accountStore } : {}),
    windowMs: limits.windowMs,
    limit: Math.max(1, Math.min(5, limits.max)),
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${emailKeyOf(req.body)}`,
    handler: (_req, _res, next) => next(tooMany()),
  });
  const perAddress = rateLimit({
    ...(addressStore ? { store: addressStore } : {}),
    windowMs: limits.windowMs,
    limit: limits.max,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => ipKeyGenerator(req.ip ?? ''),
    handler: (_req, _res, next) => next(tooMany()),
  });
  router.post('/', perAddress, perAccount, validateBody(forgotPasswordSchema), (req, res) => {
    const email: string = req.body.email;
    // Answer first, the same for everyone; the look-up and the mail happen afterwards.
    res.status(202).json({
      status: 'accepted',
      message: 'If this address belongs to an account, a link to choose a new password is on its way.',
    });
    void users
      .issueResetToken(email)
      .then((issued) => {
        if (!issued) return;
        const link = `${publicUrl}/set-password?token=${encodeURIComponent(issued.token)}`;
        mail.send(
          issued.user.email,
          passwordResetMail(issued.user.displayName, link, RESET_PASSWORD_TTL_HOURS),
        );
      })
      .catch((err: unknown) => log('Could not prepare a password-reset mail', err));
  });
  return router;
}
