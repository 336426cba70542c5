/**
 * The queue seam, shaped like BullMQ's Queue and Worker (add / processor / completed+failed events),
 * so a Redis-backed BullMQ implementation can replace the SQLite one by configuration.
 */
export interface Job<T> {
  id: string;
  name: string;
  data: T;
  attemptsMade: number;
}

export interface JobsOptions {
  /** Tries before the job is marked failed (default 3). */
  attempts?: number;
}

export type Processor<T> = (job: Job<T>) => Promise<unknown>;

export interface JobQueue<T> {
  readonly name: string;
  add(name: string, data: T, opts?: JobsOptions): Promise<Job<T>>;
  getJobCounts(): Promise<Record<'waiting' | 'active' | 'completed' | 'failed', number>>;
  close(): Promise<void>;
}

export interface WorkerEvents<T> {
  completed: [job: Job<T>, result: unknown];
  failed: [job: Job<T>, error: Error];
  error: [error: Error];
  /** Nothing is left waiting to be taken (the database queue: and nothing runs; BullMQ: jobs may still run). */
  drained: [];
}

export interface WorkerOptions {
  /** Jobs this worker runs at once (default 2). */
  concurrency?: number;
  /** The wait before the second try, doubled before each further one (default 500 ms). */
  retryBaseMs?: number;
}

/**
 * Runs a queue's jobs. `failed` is told once per job, when its last try failed (a try that will be
 * retried is not reported); `completed` once per successful run.
 */
export interface JobWorker<T> {
  on<E extends keyof WorkerEvents<T>>(event: E, listener: (...args: WorkerEvents<T>[E]) => void): this;
  /** Start taking jobs (and take back the ones a crashed run left behind). */
  start(): Promise<void>;
  /** Stop taking jobs and wait for the running ones. */
  close(): Promise<void>;
}

/** The wait before the second try of a job, doubled before each further one. */
export const RETRY_BASE_MS = 500;
