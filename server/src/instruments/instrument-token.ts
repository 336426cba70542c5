import crypto from 'node:crypto';

const TOKEN_PREFIX = 'eqt_';

export interface IssuedToken {
  token: string;
  hash: string;
  /** The first characters, shown in lists so a person can tell tokens apart. */
  prefix: string;
}

/** A new random instrument token. Only its SHA-256 is stored (it is high-entropy, so no slow hash is needed). */
export function issueInstrumentToken(): IssuedToken {
  const token = `${TOKEN_PREFIX}${crypto.randomBytes(32).toString('base64url')}`;
  return { token, hash: hashInstrumentToken(token), prefix: token.slice(0, 10) };
}

export function hashInstrumentToken(token: string): string {
  return crypto.createHash('sha256').update(token).digest('hex');
}

/** The token from an `Authorization: Bearer …` header, if it looks like one of ours. */
export function bearerToken(header: string | undefined): string | undefined {
  const match = /^Bearer\s+(eqt_[A-Za-z0-9_-]{20,100})\s*$/.exec(header ?? '');
  return match?.[1];
}
