import crypto from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { AppError } from '../common/app-error';

/** Angular's HttpClient reads this cookie and echoes it in the header below on every mutating request. */
export const CSRF_COOKIE = 'XSRF-TOKEN';
export const CSRF_HEADER = 'x-xsrf-token';
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

export interface CsrfOptions {
  secret: string;
  secureCookie: boolean;
  /** Name of the session cookie the token is bound to. */
  sessionCookie: string;
  /** The app's own public address (PUBLIC_URL); a request's own Host is accepted as well. */
  publicUrl: string;
}

function hmac(secret: string, text: string): string {
  return crypto.createHmac('sha256', secret).update(text).digest('base64url');
}

function sameText(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && crypto.timingSafeEqual(x, y);
}

/**
 * The session id inside express-session's signed cookie (`s:<sid>.<base64 HMAC-SHA256 of sid>`), or ''
 * when there is no session cookie or its signature is not ours.
 */
function sessionIdOf(req: Request, options: CsrfOptions): string {
  const raw: unknown = req.cookies?.[options.sessionCookie];
  if (typeof raw !== 'string' || !raw.startsWith('s:')) return '';
  const signed = raw.slice(2);
  const dot = signed.lastIndexOf('.');
  if (dot <= 0) return '';
  const sid = signed.slice(0, dot);
  const expected = crypto
    .createHmac('sha256', options.secret)
    .update(sid)
    .digest('base64')
    .replace(/=+$/, '');
  return sameText(signed.slice(dot + 1), expected) ? sid : '';
}

/** The origin of the page that sent a request: the Origin header, else the Referer's origin. */
function senderOrigin(req: Request): string | undefined {
  const origin = req.get('origin');
  if (origin) return origin;
  const referer = req.get('referer');
  if (!referer) return undefined;
  try {
    return new URL(referer).origin;
  } catch {
    return 'null';
  }
}

function isOwnOrigin(origin: string, req: Request, publicOrigin: string): boolean {
  if (origin === publicOrigin) return true;
  try {
    return new URL(origin).host === req.get('host');
  } catch {
    return false;
  }
}

/**
 * CSRF defence in two layers.
 * 1. A signed double-submit token bound to the session: the server issues `nonce.hmac(nonce|sessionId)`
 *    in a readable cookie; a mutating request must echo it in X-XSRF-TOKEN, and it must have been made
 *    for the session the request carries. A token planted from elsewhere (a sibling sub-domain can set
 *    cookies) is worthless for another person's session. Sign-in and sign-out change the session, so
 *    they issue a new token (`issue`).
 * 2. A mutating request whose Origin (or Referer) is present and is not the app's own is refused.
 * Requests that carry an instrument's bearer token and no cookie are not browser requests and are exempt;
 * the bearer token reaches nothing but /api/ingest and the watcher routes (/api/watcher/*).
 */
export function createCsrfProtection(options: CsrfOptions): {
  middleware: RequestHandler;
  /** Set a fresh token for the session now in force ('' after signing out). */
  issue(res: Response, sessionId: string): void;
} {
  const publicOrigin = new URL(options.publicUrl).origin;
  const tokenFor = (nonce: string, sessionId: string): string =>
    hmac(options.secret, `${nonce}|${sessionId}`);
  const isGenuine = (token: string, sessionId: string): boolean => {
    const [nonce, signature, ...rest] = token.split('.');
    if (!nonce || !signature || rest.length) return false;
    return sameText(signature, tokenFor(nonce, sessionId));
  };
  const issue = (res: Response, sessionId: string): void => {
    const nonce = crypto.randomBytes(18).toString('base64url');
    res.cookie(CSRF_COOKIE, `${nonce}.${tokenFor(nonce, sessionId)}`, {
      sameSite: 'strict',
      secure: options.secureCookie,
      httpOnly: false,
      path: '/',
    });
  };

  const middleware: RequestHandler = (req, res, next) => {
    const sessionId = sessionIdOf(req, options);
    const cookieToken: string | undefined = req.cookies?.[CSRF_COOKIE];
    const genuine = !!cookieToken && isGenuine(cookieToken, sessionId);
    if (!genuine) issue(res, sessionId);
    if (SAFE_METHODS.has(req.method)) return next();
    const bearerOnly = req.headers.authorization?.startsWith('Bearer ') && !req.headers.cookie;
    if (bearerOnly) return next();
    const origin = senderOrigin(req);
    if (origin !== undefined && !isOwnOrigin(origin, req, publicOrigin))
      return next(new AppError('cross_origin', 403, 'This request came from another site and was refused.'));
    const headerToken = req.get(CSRF_HEADER);
    if (!genuine || !headerToken || headerToken !== cookieToken)
      return next(new AppError('csrf', 403, 'Missing or invalid XSRF token: reload the page and try again.'));
    next();
  };
  return { middleware, issue };
}
