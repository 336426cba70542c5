import type { RequestHandler } from 'express';
import { AppError } from '../common/app-error';
import type { Role, User } from '../users/user.entity';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // passport puts the signed-in person here
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends Pick<
      import('../users/user.entity').User,
      'id' | 'email' | 'displayName' | 'role' | 'active'
    > {}
  }
}

/** The one role check of a router: `router.use(requireRole('admin'))`. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    const user = req.user as User | undefined;
    if (!user) return next(AppError.unauthorized());
    if (!roles.includes(user.role)) return next(AppError.forbidden());
    next();
  };
}

/** Any signed-in person, whatever the role. */
export const requireSignedIn: RequestHandler = (req, _res, next) => {
  if (!req.user) return next(AppError.unauthorized());
  next();
};
