import crypto from 'node:crypto';

/**
 * The signing secrets are needed in clear to sign, so they are encrypted rather than hashed: AES-256-GCM
 * with a key derived from SESSION_SECRET by HKDF-SHA256 (RFC 5869). Stored as `v1.<iv>.<tag>.<data>`
 * (base64url). Changing SESSION_SECRET makes the stored secrets unreadable: deliveries then fail with a
 * message saying to enter the secret again.
 */
export class SecretBox {
  private readonly key: Buffer;

  constructor(sessionSecret: string) {
    this.key = Buffer.from(
      crypto.hkdfSync('sha256', sessionSecret, 'equilight-webhooks', 'webhook-secret-v1', 32),
    );
  }

  seal(plain: string): string {
    const iv = crypto.randomBytes(12);
    const cipher = crypto.createCipheriv('aes-256-gcm', this.key, iv);
    const data = Buffer.concat([cipher.update(plain, 'utf8'), cipher.final()]);
    return ['v1', iv, cipher.getAuthTag(), data]
      .map((p) => (typeof p === 'string' ? p : p.toString('base64url')))
      .join('.');
  }

  open(sealed: string): string {
    const [version, iv, tag, data] = sealed.split('.');
    if (version !== 'v1' || !iv || !tag || data === undefined)
      throw new Error('the stored webhook secret is not in a known format');
    const decipher = crypto.createDecipheriv('aes-256-gcm', this.key, Buffer.from(iv, 'base64url'));
    decipher.setAuthTag(Buffer.from(tag, 'base64url'));
    try {
      return Buffer.concat([decipher.update(Buffer.from(data, 'base64url')), decipher.final()]).toString(
        'utf8',
      );
    } catch {
      throw new Error(
        'the stored webhook secret cannot be decrypted (was SESSION_SECRET changed?); enter the secret again',
      );
    }
  }
}

/**
 * `X-Equilight-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of "<t>.<raw body>">`. The time inside
 * the signed text lets a receiver refuse old replays.
 */
export function signatureHeader(secret: string, body: string, unixSeconds: number): string {
  const mac = crypto.createHmac('sha256', secret).update(`${unixSeconds}.${body}`, 'utf8').digest('hex');
  return `t=${unixSeconds},v1=${mac}`;
}

const EVENT_NAMESPACE = 'c0b5a7e2-4d1f-5e8a-9b3c-6f2d1e0a7b94';

/**
 * A name-based UUID (version 5, RFC 9562 §5.5: SHA-1 of namespace + name) so that the same occurrence
 * (e.g. "batch.approved:12:2026-…") always gets the same event id, whatever publishes it how often.
 */
export function uuidV5(name: string, namespace = EVENT_NAMESPACE): string {
  const ns = Buffer.from(namespace.replace(/-/g, ''), 'hex');
  const hash = crypto.createHash('sha1').update(ns).update(name, 'utf8').digest();
  hash[6] = (hash[6]! & 0x0f) | 0x50;
  hash[8] = (hash[8]! & 0x3f) | 0x80;
  const hex = hash.subarray(0, 16).toString('hex');
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}
