import type { RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import type { Archive } from '../ingest/archive';
import { redactUrl } from '../config';
import { checkArchive } from './archive-check';

export interface HealthReport {
  status: 'ok' | 'degraded';
  service: 'equilight';
  reasons?: string[];
}

/** The Redis this process uses (REDIS_URL, or QUEUE_URL on Redis), as health asks it. */
export interface RedisProbe {
  url: string;
  ping(): Promise<unknown>;
}

/** How long health waits for Redis to answer a PING. */
const REDIS_WAIT_MS = 1000;

/**
 * What /api/health reports. Every call touches the database, and Redis when one is configured; problems
 * found at start (the raw-file archive) stay listed until the next start. A database that does not answer
 * is 503 (the server cannot do its work); other problems are `degraded` with 200 (it still serves what
 * is stored, but someone should look): a Redis that does not answer holds up live events across servers,
 * the shared sign-in limits and, with QUEUE_URL on Redis, new files.
 */
export class HealthService {
  private startProblems: string[] = [];

  constructor(
    private readonly dataSource: DataSource,
    private readonly archive: Archive,
    private readonly redis: RedisProbe | null = null,
  ) {}

  /** The start checks that do not stop the server: the archive (folder or bucket) and a sample of its files. */
  async checkAtStart(): Promise<string[]> {
    this.startProblems = await checkArchive(this.dataSource, this.archive).catch((err: unknown) => [
      `archive: could not be checked (${err instanceof Error ? err.message : String(err)})`,
    ]);
    return this.startProblems;
  }

  async report(): Promise<{ httpStatus: number; body: HealthReport }> {
    const reasons = [...this.startProblems];
    let databaseAnswers = true;
    try {
      await this.dataSource.query('SELECT 1');
    } catch (err) {
      databaseAnswers = false;
      reasons.unshift(`database: does not answer (${err instanceof Error ? err.message : String(err)})`);
    }
    if (this.redis) {
      const problem = await this.redisProblem(this.redis);
      if (problem) reasons.push(problem);
    }
    const body: HealthReport = reasons.length
      ? { status: 'degraded', service: 'equilight', reasons }
      : { status: 'ok', service: 'equilight' };
    return { httpStatus: databaseAnswers ? 200 : 503, body };
  }

  private async redisProblem(redis: RedisProbe): Promise<string | null> {
    let timer: NodeJS.Timeout | undefined;
    const waited = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`no answer within ${REDIS_WAIT_MS} ms`)), REDIS_WAIT_MS);
    });
    try {
      await Promise.race([redis.ping(), waited]);
      return null;
    } catch (err) {
      return (
        `redis: ${redactUrl(redis.url)} does not answer (${err instanceof Error ? err.message : String(err)}); ` +
        'live events across servers, shared sign-in limits and a queue on Redis wait for it'
      );
    } finally {
      clearTimeout(timer);
    }
  }

  handler(): RequestHandler {
    return (_req, res, next) => {
      this.report().then(({ httpStatus, body }) => res.status(httpStatus).json(body), next);
    };
  }
}
