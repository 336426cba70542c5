import { requireSignedIn } from './roles';
import { Router, type Request, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { PassportStatic } from 'passport';
import { AppError } from '../common/app-error';
import { validateBody } from '../common/validate';
import { emailKeyOf } from '../contracts/email-address';
import { type User, toPublicUser } from '../users/user.entity';
import type { UsersService } from '../users/users.service';
import { loginSchema, setPasswordSchema } from '../contracts/auth';
import { inProcessCounts, type RateLimitStores } from '../redis/rate-limit-stores';

function authenticate(passport: PassportStatic, req: Request): Promise<User> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: User | false, info?: { message?: string }) => {
      if (err) return reject(err);
      if (!user) return reject(AppError.unauthorized(info?.message ?? 'E-mail or password is not correct.'));
      resolve(user);
    })(req);
  });
}

/** Sign-in, sign-out, who am I, set a password from a one-time link. Open routes: the role check is per handler. */
export function authRouter(
  passport: PassportStatic,
  users: UsersService,
  limits: { max: number; windowMs: number },
  /** Issue the XSRF token for the session now in force: sign-in and sign-out change the session. */
  newXsrfToken: (res: Response, sessionId: string) => void,
  /** Where the counts live: this process, or Redis shared by every server process. */
  stores: RateLimitStores = inProcessCounts,
): Router {
  const router = Router();
  const store = stores('login');
  const loginLimiter = rateLimit({
    ...(store ? { store } : {}),
    windowMs: limits.windowMs,
    limit: limits.max,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    // Only failed attempts count: a lab signing in all day is not an attack.
    skipSuccessfulRequests: true,
    // Per address and account: one person mistyping does not lock out the lab's shared address.
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${emailKeyOf(req.body)}`,
    handler: (_req, _res, next) =>
      next(
        new AppError(
          'too_many_attempts',
          429,
          'Too many sign-in attempts; wait a few minutes and try again.',
        ),
      ),
  });

  router.post('/login', loginLimiter, validateBody(loginSchema), async (req, res) => {
    const user = await authenticate(passport, req);
    await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
    newXsrfToken(res, req.sessionID);
    res.json(toPublicUser(user));
  });

  router.post('/logout', async (req, res) => {
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
    res.clearCookie('equilight.sid');
    newXsrfToken(res, '');
    res.status(204).end();
  });

  router.get('/me', requireSignedIn, (req, res) => {
    res.json(toPublicUser(req.user as User));
  });

  router.post('/set-password', loginLimiter, validateBody(setPasswordSchema), async (req, res) => {
    // A signed-in person redeeming a link for their own account keeps this session; every other one ends.
    const keep = req.user ? req.sessionID : undefined;
    res.json(await users.setPasswordWithToken(req.body.token, req.body.password, keep));
  });

  return router;
}
