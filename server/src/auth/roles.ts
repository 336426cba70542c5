import type { RequestHandler } from 'express';
import { AppError } from '../common/app-error';
import { ROLES } from '../contracts/roles';
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

/** A role check; `roles` says whom it lets through (the route-table test reads it). */
export type RoleCheck = RequestHandler & { readonly roles: readonly Role[] };

/** The one role check of a router: `router.use(requireRole('admin'))`. */
export function requireRole(...roles: Role[]): RoleCheck {
  const check: RequestHandler = (req, _res, next) => {
    const user = req.user as User | undefined;
    if (!user) return next(AppError.unauthorized());
    if (!roles.includes(user.role)) return next(AppError.forbidden());
    next();
  };
  return Object.assign(check, { roles: Object.freeze([...roles]) });
}

/** Any signed-in person, whatever the role. */
export const requireSignedIn: RoleCheck = Object.assign<RequestHandler, { roles: readonly Role[] }>(
  (req, _res, next) => {
    if (!req.user) return next(AppError.unauthorized());
    next();
  },
  { roles: ROLES },
);
