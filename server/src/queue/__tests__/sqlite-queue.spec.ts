import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../database/data-source';
import type { Job } from '../job-queue';
import { SqliteJobQueue, SqliteJobWorker } from '../sqlite-queue';

describe('SQLite-backed job queue', () => {
  let dir: string;
  let dataSource: DataSource;
  const open = () => openDatabase({ database: { type: 'sqlite', file: path.join(dir, 'q.sqlite') } });

  beforeEach(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-queue-'));
    dataSource = await open();
  });
  afterEach(async () => {
    if (dataSource.isInitialized) await dataSource.destroy();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const drained = (worker: SqliteJobWorker<unknown>) =>
    new Promise<void>((r) => worker.once('drained', () => r()));

  it('runs added jobs with bounded concurrency and emits completed', async () => {
    const queue = new SqliteJobQueue<{ n: number }>('test', dataSource);
    let running = 0;
    let peak = 0;
    const done: number[] = [];
    const worker = new SqliteJobWorker(
      queue,
      async (job) => {
        running++;
        peak = Math.max(peak, running);
        await new Promise((r) => setTimeout(r, 10));
        running--;
        return job.data.n * 2;
      },
      { concurrency: 2 },
    );
    worker.on('completed', (_job, result) => done.push(result as number));
    await worker.start();
    for (let n = 1; n <= 6; n++) await queue.add('double', { n });
    await drained(worker as SqliteJobWorker<unknown>);
    expect(done.sort((a, b) => a - b)).toEqual([2, 4, 6, 8, 10, 12]);
    expect(peak).toBe(2);
    expect(await queue.getJobCounts()).toEqual({ waiting: 0, active: 0, completed: 6, failed: 0 });
    await worker.close();
  });

  it('retries a failing job and marks it failed after its attempts', async () => {
    const queue = new SqliteJobQueue<object>('test', dataSource);
    let tries = 0;
    const worker = new SqliteJobWorker(queue, async () => {
      tries++;
      throw new Error('disk unplugged');
    });
    const failed = new Promise<[Job<object>, Error]>((r) => worker.on('failed', (job, err) => r([job, err])));
    await worker.start();
    await queue.add('doomed', {}, { attempts: 2 });
    const [job, err] = await failed;
    expect(tries).toBe(2);
    expect(job.attemptsMade).toBe(2);
    expect(err.message).toBe('disk unplugged');
    expect(await queue.getJobCounts()).toMatchObject({ failed: 1, waiting: 0 });
    await worker.close();
  });

  it('when the process died mid-job then the next start runs it again', async () => {
    const queue = new SqliteJobQueue<{ n: number }>('test', dataSource);
    await queue.add('a', { n: 1 });
    await queue.add('b', { n: 2 });
    // what a kill -9 leaves behind: one job taken, never finished
    await queue.jobs.update({ name: 'a' }, { status: 'active' });
    await dataSource.destroy();

    dataSource = await open();
    const reopened = new SqliteJobQueue<{ n: number }>('test', dataSource);
    const seen: string[] = [];
    const worker = new SqliteJobWorker(reopened, async (job) => void seen.push(job.name));
    const idle = drained(worker as SqliteJobWorker<unknown>);
    await worker.start();
    await idle;
    expect(seen.sort()).toEqual(['a', 'b']);
    expect(await reopened.getJobCounts()).toMatchObject({ completed: 2, active: 0, waiting: 0 });
    await worker.close();
  });

  it('keeps queues apart by name', async () => {
    const a = new SqliteJobQueue<object>('alpha', dataSource);
    const b = new SqliteJobQueue<object>('beta', dataSource);
    await a.add('x', {});
    expect((await a.getJobCounts()).waiting).toBe(1);
    expect((await b.getJobCounts()).waiting).toBe(0);
  });
});
