import crypto from 'node:crypto';
import type { RequestHandler } from 'express';
import { AppError } from '../common/app-error';

/** Angular's HttpClient reads this cookie and echoes it in the header below on every mutating request. */
export const CSRF_COOKIE = 'XSRF-TOKEN';
export const CSRF_HEADER = 'x-xsrf-token';
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function sign(secret: string, nonce: string): string {
  return crypto.createHmac('sha256', secret).update(nonce).digest('base64url');
}

function isGenuine(secret: string, token: string): boolean {
  const [nonce, signature] = token.split('.');
  if (!nonce || !signature) return false;
  const expected = Buffer.from(sign(secret, nonce));
  const given = Buffer.from(signature);
  return expected.length === given.length && crypto.timingSafeEqual(expected, given);
}

/**
 * Signed double-submit cookie: the server issues `nonce.hmac(nonce)` in a readable cookie; a mutating
 * request must send the same value in the X-XSRF-TOKEN header, and the signature must be ours.
 * Requests that carry an instrument's bearer token and no cookie are not browser requests and are exempt.
 */
export function csrfProtection(options: { secret: string; secureCookie: boolean }): RequestHandler {
  return (req, res, next) => {
    const cookieToken: string | undefined = req.cookies?.[CSRF_COOKIE];
    if (!cookieToken || !isGenuine(options.secret, cookieToken)) {
      const nonce = crypto.randomBytes(18).toString('base64url');
      res.cookie(CSRF_COOKIE, `${nonce}.${sign(options.secret, nonce)}`, {
        sameSite: 'strict',
        secure: options.secureCookie,
        httpOnly: false,
        path: '/',
      });
    }
    if (SAFE_METHODS.has(req.method)) return next();
    const bearerOnly = req.headers.authorization?.startsWith('Bearer ') && !req.headers.cookie;
    if (bearerOnly) return next();
    const headerToken = req.get(CSRF_HEADER);
    if (
      !cookieToken ||
      !headerToken ||
      headerToken !== cookieToken ||
      !isGenuine(options.secret, cookieToken)
    ) {
      return next(new AppError('csrf', 403, 'Missing or invalid XSRF token: reload the page and try again.'));
    }
    next();
  };
}
