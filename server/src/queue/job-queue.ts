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
  drained: [];
}

export interface JobWorker<T> {
  on<E extends keyof WorkerEvents<T>>(event: E, listener: (...args: WorkerEvents<T>[E]) => void): this;
  close(): Promise<void>;
}
