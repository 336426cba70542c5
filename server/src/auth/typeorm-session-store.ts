import session from 'express-session';
import { LessThan, type Repository } from 'typeorm';
import { SessionRow } from './session.entity';

type Callback = (err?: unknown) => void;

function ownerOf(sess: session.SessionData): number | null {
  const user = (sess as { passport?: { user?: unknown } }).passport?.user;
  return typeof user === 'number' ? user : null;
}

/** express-session store on our own TypeORM entity, so it works on SQLite and PostgreSQL alike. */
export class TypeOrmSessionStore extends session.Store {
  private readonly pruneTimer: NodeJS.Timeout;

  constructor(
    private readonly repository: Repository<SessionRow>,
    private readonly defaultMaxAgeMs: number,
    pruneEveryMs = 15 * 60_000,
  ) {
    super();
    this.pruneTimer = setInterval(() => void this.prune().catch(() => undefined), pruneEveryMs);
    this.pruneTimer.unref();
  }

  private expiry(sess: session.SessionData): number {
    const expires = sess.cookie?.expires;
    return expires ? new Date(expires).getTime() : Date.now() + this.defaultMaxAgeMs;
  }

  override get(sid: string, callback: (err: unknown, session?: session.SessionData | null) => void): void {
    this.repository
      .findOneBy({ sid })
      .then((row) => {
        if (!row || Number(row.expiresAt) <= Date.now()) return callback(null, null);
        callback(null, JSON.parse(row.data) as session.SessionData);
      })
      .catch((err) => callback(err));
  }

  override set(sid: string, sess: session.SessionData, callback?: Callback): void {
    this.repository
      .upsert({ sid, expiresAt: this.expiry(sess), data: JSON.stringify(sess), userId: ownerOf(sess) }, [
        'sid',
      ])
      .then(() => callback?.())
      .catch((err) => callback?.(err));
  }

  override touch(sid: string, sess: session.SessionData, callback?: Callback): void {
    this.repository
      .update({ sid }, { expiresAt: this.expiry(sess) })
      .then(() => callback?.())
      .catch((err) => callback?.(err));
  }

  /** Ends a session (sign-out); emits `ended` so that live connections of the session close too. */
  override destroy(sid: string, callback?: Callback): void {
    this.repository
      .delete({ sid })
      .then(() => {
        this.emit('ended', sid);
        callback?.();
      })
      .catch((err) => callback?.(err));
  }

  /** End every session of a person except the one given (the one making the change, if it is theirs). */
  async destroyAllOf(userId: number, exceptSid?: string): Promise<number> {
    const query = this.repository
      .createQueryBuilder()
      .delete()
      .from(SessionRow)
      .where('user_id = :userId', { userId });
    if (exceptSid) query.andWhere('sid <> :exceptSid', { exceptSid });
    return (await query.execute()).affected ?? 0;
  }

  async prune(): Promise<void> {
    await this.repository.delete({ expiresAt: LessThan(Date.now()) });
  }

  close(): void {
    clearInterval(this.pruneTimer);
  }
}
