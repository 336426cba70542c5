/**
 * The one form of an e-mail address used for look-ups, uniqueness and rate-limit keys: Unicode NFKC
 * (so full-width or compatibility characters compare equal to their plain forms), surrounding white
 * space removed, lower case. Sign-in, the sign-in limiter, new people, invitations and password resets
 * all go through this function, so " Admin@Lab.test" and "admin@lab.test" are one account and one key.
 */
export function normaliseEmail(value: string): string {
  return value.normalize('NFKC').trim().toLowerCase();
}

/** The normalised e-mail of a request body for a rate-limit key; '' when the body has none. */
export function emailKeyOf(body: unknown): string {
  const email = (body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' ? normaliseEmail(email) : '';
}
