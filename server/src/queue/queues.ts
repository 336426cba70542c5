import type { DataSource } from 'typeorm';
import { type QueueConfig, redactUrl } from '../config';
import { BullJobQueue, BullJobWorker } from './bullmq-queue';
import type { JobQueue, JobWorker, Processor, WorkerOptions } from './job-queue';
import { SqliteJobQueue, SqliteJobWorker } from './sqlite-queue';

/** Where the app's queues live (QUEUE_URL): makes each named queue and the worker that runs it here. */
export interface Queues {
  queue<T>(name: string): JobQueue<T>;
  worker<T>(queue: JobQueue<T>, processor: Processor<T>, opts?: WorkerOptions): JobWorker<T>;
  /** For the start line: where jobs are kept (no password). */
  describe(): string;
}

/** The queues of `config`: rows of the app's database, worked in this process; or BullMQ on Redis. */
export function createQueues(config: QueueConfig, dataSource: DataSource): Queues {
  if (config.type === 'redis') {
    return {
      queue: (name) => new BullJobQueue(name, config),
      worker: (queue, processor, opts) => new BullJobWorker(queue.name, config, processor, opts),
      describe: () => `BullMQ on ${redactUrl(config.url)} (key prefix ${config.prefix})`,
    };
  }
  return {
    queue: (name) => new SqliteJobQueue(name, dataSource),
    worker: (queue, processor, opts) => {
      if (!(queue instanceof SqliteJobQueue)) throw new Error(`Queue ${queue.name} is not in the database`);
      return new SqliteJobWorker(queue, processor, opts);
    },
    describe: () => 'in the database, worked in this process',
  };
}
