import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { AuthService } from '../auth/auth.service';

/** A 401 from any API call (other than sign-in itself) means the session ended: go to sign-in. */
export const authInterceptor: HttpInterceptorFn = (req, next) => {
  const auth = inject(AuthService);
  const router = inject(Router);
  return next(req).pipe(
    catchError((err: unknown) => {
      const isAuthCall = req.url.startsWith('/api/auth/');
      if (err instanceof HttpErrorResponse && err.status === 401 && !isAuthCall) {
        auth.clear();
        void router.navigate(['/sign-in'], { queryParams: { returnUrl: router.url } });
      }
      return throwError(() => err);
    }),
  );
};

/** The message of the API's `{ error: { code, message } }` body, or a plain fallback. */
export function apiErrorMessage(err: unknown, fallback = 'Something went wrong; try again.'): string {
  if (err instanceof HttpErrorResponse) {
    const message = (err.error as { error?: { message?: unknown } } | null)?.error?.message;
    if (typeof message === 'string') return message;
    if (err.status === 0) return 'The server cannot be reached; check the connection.';
  }
  return fallback;
}
