import type { RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import type { Archive } from '../ingest/archive';
import { checkArchive } from './archive-check';

export interface HealthReport {
  status: 'ok' | 'degraded';
  service: 'equilight';
  reasons?: string[];
}

/**
 * What /api/health reports. Every call touches the database; problems found at start (the raw-file
 * archive) stay listed until the next start. A database that does not answer is 503 (the server cannot
 * do its work); other problems are `degraded` with 200 (it still serves, but someone should look).
 */
export class HealthService {
  private startProblems: string[] = [];

  constructor(
    private readonly dataSource: DataSource,
    private readonly archive: Archive,
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
    const body: HealthReport = reasons.length
      ? { status: 'degraded', service: 'equilight', reasons }
      : { status: 'ok', service: 'equilight' };
    return { httpStatus: databaseAnswers ? 200 : 503, body };
  }

  handler(): RequestHandler {
    return (_req, res, next) => {
      this.report().then(({ httpStatus, body }) => res.status(httpStatus).json(body), next);
    };
  }
}
