import { EventEmitter } from 'node:events';
import os from 'node:os';
import { type Job as BullJob, Queue, type RedisOptions, Worker } from 'bullmq';
import type { RedisConfig } from '../config';
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

/** The back-off type of every job: the worker's own strategy (doubling from its `retryBaseMs`). */
const DOUBLING = 'doubling';

/**
 * How long a worker's hold on a running job lasts without renewal (renewed every half of it). A process
 * that dies (kill -9, power) stops renewing; another process's stall check, every `stalledIntervalMs`,
 * then puts the job back to waiting: a dead process's jobs are taken over within about
 * lock + 2 × interval. The lock must outlast the longest pause of the event loop (parsing runs on a
 * worker thread, so the main thread only waits on I/O).
 */
export const LOCK_DURATION_MS = 10_000;
export const STALLED_INTERVAL_MS = 5_000;
/** A job taken back from a dead or stuck worker this many times is failed (a file that kills its worker). */
const MAX_STALLED_COUNT = 2;

/** Finished jobs kept in Redis for a look (the intake list is the record): a day, at most 5000 of each. */
const KEEP_COMPLETED = { age: 24 * 3600, count: 5000 };
const KEEP_FAILED = { age: 14 * 24 * 3600, count: 5000 };

export interface BullWorkerOptions extends WorkerOptions {
  /** Tests shorten these to see a take-over quickly. */
  lockDurationMs?: number;
  stalledIntervalMs?: number;
}

function connectionOf(redis: RedisConfig): RedisOptions {
  return { url: redis.url };
}

function toJob<T>(job: BullJob<T>): Job<T> {
  return { id: String(job.id), name: job.name, data: job.data, attemptsMade: job.attemptsMade };
}

/**
 * The job queue on Redis through BullMQ, for several server processes: any process adds, every
 * process's worker takes jobs, and a job whose process died is taken over by another. Keys start with
 * `<prefix>:<queue name>`.
 */
export class BullJobQueue<T> implements JobQueue<T> {
  private readonly queue: Queue;

  constructor(
    readonly name: string,
    redis: RedisConfig,
  ) {
    this.queue = new Queue<T, unknown, string>(name, {
      connection: connectionOf(redis),
      prefix: redis.prefix,
    });
  }

  async add(name: string, data: T, opts: JobsOptions = {}): Promise<Job<T>> {
    const job = await this.queue.add(name, data, {
      attempts: opts.attempts ?? 3,
      backoff: { type: DOUBLING },
      removeOnComplete: KEEP_COMPLETED,
      removeOnFail: KEEP_FAILED,
    });
    return toJob(job as BullJob<T>);
  }

  async getJobCounts(): Promise<Record<'waiting' | 'active' | 'completed' | 'failed', number>> {
    const n = await this.queue.getJobCounts(
      'waiting',
      'delayed',
      'prioritized',
      'active',
      'completed',
      'failed',
    );
    const count = (type: string) => n[type] ?? 0;
    return {
      // As in the database queue, a job waiting for its next try is waiting.
      waiting: count('waiting') + count('delayed') + count('prioritized'),
      active: count('active'),
      completed: count('completed'),
      failed: count('failed'),
    };
  }

  async close(): Promise<void> {
    await this.queue.close();
  }
}

/**
 * Runs a BullMQ queue's jobs in this process with bounded concurrency. Tries and their doubling waits as
 * the database queue's worker: `failed` only when the last try failed.
 */
export class BullJobWorker<T> extends EventEmitter implements JobWorker<T> {
  private readonly worker: Worker<T, unknown, string>;

  constructor(queueName: string, redis: RedisConfig, processor: Processor<T>, opts: BullWorkerOptions = {}) {
    super();
    const retryBaseMs = opts.retryBaseMs ?? RETRY_BASE_MS;
    this.worker = new Worker<T, unknown, string>(queueName, (job) => processor(toJob(job)), {
      connection: connectionOf(redis),
      prefix: redis.prefix,
      autorun: false,
      concurrency: opts.concurrency ?? 2,
      lockDuration: opts.lockDurationMs ?? LOCK_DURATION_MS,
      stalledInterval: opts.stalledIntervalMs ?? STALLED_INTERVAL_MS,
      maxStalledCount: MAX_STALLED_COUNT,
      // Recorded on each job as it runs: which process took it.
      name: `${os.hostname()}:${process.pid}`,
      settings: { backoffStrategy: (attemptsMade) => retryBaseMs * 2 ** (attemptsMade - 1) },
    });
    this.worker.on('completed', (job, result) => this.emit('completed', toJob(job), result));
    this.worker.on('failed', (job, error) => {
      // No job: one that stalled too often was failed and already removed; nothing is left to mark.
      if (!job) this.emit('error', error);
      // finishedOn is set only when the job has no try left; a retry is not a failure yet.
      // A try cut short by a dead worker counts too (BullMQ counts it as started, not made).
      else if (job.finishedOn)
        this.emit(
          'failed',
          { ...toJob(job), attemptsMade: Math.max(job.attemptsMade, job.attemptsStarted) },
          error,
        );
    });
    this.worker.on('error', (error) => this.emit('error', error));
    this.worker.on('drained', () => this.emit('drained'));
  }

  override on<E extends keyof WorkerEvents<T>>(
    event: E,
    listener: (...args: WorkerEvents<T>[E]) => void,
  ): this {
    return super.on(event, listener as (...args: unknown[]) => void);
  }

  /** Connect and start taking jobs; the stall check takes back jobs of processes that died. */
  async start(): Promise<void> {
    await this.worker.waitUntilReady();
    if (!this.worker.isRunning()) void this.worker.run().catch((err: unknown) => this.emit('error', err));
  }

  /** Stop taking jobs and wait for the running ones. */
  async close(): Promise<void> {
    await this.worker.close();
  }
}
