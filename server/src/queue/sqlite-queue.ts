import { EventEmitter } from 'node:events';
import PQueue from 'p-queue';
import { type DataSource, In, type Repository } from 'typeorm';
import {
  type Job,
  type JobQueue,
  type JobWorker,
  type JobsOptions,
  type Processor,
  RETRY_BASE_MS,
  type WorkerEvents,
  type WorkerOptions,
} from './job-queue';
import { JobRow } from './job.entity';

export type { WorkerOptions } from './job-queue';

function toJob<T>(row: JobRow): Job<T> {
  return {
    id: String(row.id),
    name: row.name,
    data: JSON.parse(row.data) as T,
    attemptsMade: row.attemptsMade,
  };
}

/**
 * A job queue whose jobs are rows in the app's own database and whose work runs in this process
 * through p-queue with bounded concurrency. Single-process by design: on start, jobs left `active`
 * by a crash are put back to `waiting` and run again (processors must therefore be idempotent).
 */
export class SqliteJobQueue<T> implements JobQueue<T> {
  readonly jobs: Repository<JobRow>;
  /** Local signal to the worker that a job was added. */
  readonly added = new EventEmitter();

  constructor(
    readonly name: string,
    dataSource: DataSource,
  ) {
    this.jobs = dataSource.getRepository(JobRow);
  }

  async add(name: string, data: T, opts: JobsOptions = {}): Promise<Job<T>> {
    // insert, not save: one statement, no transaction of its own and no re-read (the id is filled in).
    const row = this.jobs.create({
      queue: this.name,
      name,
      data: JSON.stringify(data),
      status: 'waiting',
      attemptsMade: 0,
      maxAttempts: opts.attempts ?? 3,
      failedReason: null,
      createdAt: Date.now(),
      finishedAt: null,
    });
    await this.jobs.insert(row);
    this.added.emit('job', row.id);
    return toJob<T>(row);
  }

  async getJobCounts(): Promise<Record<'waiting' | 'active' | 'completed' | 'failed', number>> {
    const counts = { waiting: 0, active: 0, completed: 0, failed: 0 };
    const rows: { status: keyof typeof counts; n: number | string }[] = await this.jobs
      .createQueryBuilder('j')
      .select('j.status', 'status')
      .addSelect('COUNT(*)', 'n')
      .where('j.queue = :queue', { queue: this.name })
      .groupBy('j.status')
      .getRawMany();
    for (const row of rows) counts[row.status] = Number(row.n);
    return counts;
  }

  async close(): Promise<void> {
    this.added.removeAllListeners();
  }
}

/** Runs a queue's jobs with bounded concurrency; emits `completed`, `failed`, `error`, `drained`. */
export class SqliteJobWorker<T> extends EventEmitter implements JobWorker<T> {
  private readonly pq: PQueue;
  private readonly retryBaseMs: number;
  private readonly scheduled = new Set<number>();
  private readonly timers = new Set<NodeJS.Timeout>();
  private closed = false;
  private readonly onAdded = (id: number) => this.schedule(id);

  constructor(
    private readonly queue: SqliteJobQueue<T>,
    private readonly processor: Processor<T>,
    opts: WorkerOptions = {},
  ) {
    super();
    this.pq = new PQueue({ concurrency: opts.concurrency ?? 2 });
    this.retryBaseMs = opts.retryBaseMs ?? RETRY_BASE_MS;
    this.pq.on('idle', () => this.emit('drained'));
    queue.added.on('job', this.onAdded);
  }

  override on<E extends keyof WorkerEvents<T>>(
    event: E,
    listener: (...args: WorkerEvents<T>[E]) => void,
  ): this {
    return super.on(event, listener as (...args: unknown[]) => void);
  }

  /** Recover after a crash and start on every waiting job, oldest first. */
  async start(): Promise<void> {
    await this.queue.jobs.update({ queue: this.queue.name, status: 'active' }, { status: 'waiting' });
    const waiting = await this.queue.jobs.find({
      where: { queue: this.queue.name, status: 'waiting' },
      order: { id: 'ASC' },
      select: { id: true },
    });
    for (const row of waiting) this.schedule(row.id);
  }

  private schedule(id: number): void {
    if (this.closed || this.scheduled.has(id)) return;
    this.scheduled.add(id);
    void this.pq.add(() => this.run(id)).catch((err: unknown) => this.emit('error', err as Error));
  }

  private async run(id: number): Promise<void> {
    this.scheduled.delete(id);
    if (this.closed) return;
    const row = await this.queue.jobs.findOneBy({ id });
    if (!row || row.status !== 'waiting') return;
    await this.queue.jobs.update({ id, status: In(['waiting']) }, { status: 'active' });
    const job = toJob<T>(row);
    try {
      const result = await this.processor(job);
      await this.queue.jobs.update({ id }, { status: 'completed', finishedAt: Date.now() });
      this.emit('completed', job, result);
    } catch (err) {
      if (this.closed) return; // left `active`; the next start puts it back to waiting
      const error = err instanceof Error ? err : new Error(String(err));
      const attemptsMade = row.attemptsMade + 1;
      const retry = attemptsMade < row.maxAttempts;
      await this.queue.jobs.update(
        { id },
        {
          status: retry ? 'waiting' : 'failed',
          attemptsMade,
          failedReason: error.message,
          finishedAt: retry ? null : Date.now(),
        },
      );
      if (retry) {
        const timer = setTimeout(
          () => {
            this.timers.delete(timer);
            this.schedule(id);
          },
          this.retryBaseMs * 2 ** (attemptsMade - 1),
        );
        this.timers.add(timer);
      } else {
        this.emit('failed', { ...job, attemptsMade }, error);
      }
    }
  }

  /** Stop taking jobs and wait for the running ones. */
  async close(): Promise<void> {
    this.closed = true;
    this.queue.added.off('job', this.onAdded);
    for (const timer of this.timers) clearTimeout(timer);
    this.pq.clear();
    await this.pq.onIdle();
  }
}
