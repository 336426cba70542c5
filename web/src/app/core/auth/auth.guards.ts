import { inject } from '@angular/core';
import { type CanActivateFn, RedirectCommand, Router } from '@angular/router';
import { AuthService } from './auth.service';
import type { Role } from './user';

/** Signed-out people go to the sign-in page and come back afterwards. */
export const signedInGuard: CanActivateFn = (_route, state) => {
  const auth = inject(AuthService);
  if (auth.signedIn()) return true;
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};

/** The path of the page that says a role may not open a page. */
export const NOT_ALLOWED_PATH = 'not-allowed';

/**
 * Only the given roles may open the route. Others see the "not allowed" page, which names the roles
 * the page is for; the address bar keeps the address they asked for.
 */
export function roleGuard(...roles: Role[]): CanActivateFn {
  return () => {
    const auth = inject(AuthService);
    if (auth.hasRole(...roles)) return true;
    const tree = inject(Router).createUrlTree(['/', NOT_ALLOWED_PATH], {
      queryParams: { for: roles.join(',') },
    });
    return new RedirectCommand(tree, { skipLocationChange: true });
  };
}
