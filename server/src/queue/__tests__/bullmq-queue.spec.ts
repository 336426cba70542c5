import { Worker } from 'bullmq';
import { describeWithRedis, removeRedisKeys, testRedisConfig } from '../../testing/redis';
import { BullJobQueue, BullJobWorker } from '../bullmq-queue';
import type { Job } from '../job-queue';

jest.setTimeout(30_000);

/** The BullMQ queue behind the Queue/Worker seam, on a real Redis, with a key prefix of this file's own. */
describeWithRedis('BullMQ job queue', () => {
  const redis = testRedisConfig('queue');
  const open: { close(): Promise<void> }[] = [];
  let n = 0;
  /** A fresh queue name per test: tests never see each other's jobs. */
  const queueName = () => `q${++n}`;
  const track = <C extends { close(): Promise<void> }>(c: C): C => {
    open.push(c);
    return c;
  };

  afterEach(async () => {
    for (const c of open.splice(0).reverse()) await c.close();
  });
  afterAll(async () => {
    await removeRedisKeys(redis.prefix);
  });

  const drained = (worker: BullJobWorker<unknown>) =>
    new Promise<void>((r) => worker.once('drained', () => r()));

  it('runs added jobs with bounded concurrency and emits completed', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<{ n: number }>(name, redis));
    let running = 0;
    let peak = 0;
    const done: number[] = [];
    const worker = track(
      new BullJobWorker<{ n: number }>(
        name,
        redis,
        async (job) => {
          running++;
          peak = Math.max(peak, running);
          await new Promise((r) => setTimeout(r, 30));
          running--;
          return job.data.n * 2;
        },
        { concurrency: 2 },
      ),
    );
    const allDone = new Promise<void>((resolve) =>
      worker.on('completed', (_job, result) => {
        done.push(result as number);
        if (done.length === 6) resolve();
      }),
    );
    for (let i = 1; i <= 6; i++) await queue.add('double', { n: i });
    await worker.start();
    await allDone;
    expect(done.sort((a, b) => a - b)).toEqual([2, 4, 6, 8, 10, 12]);
    expect(peak).toBe(2);
    expect(await queue.getJobCounts()).toEqual({ waiting: 0, active: 0, completed: 6, failed: 0 });
  });

  it('retries a failing job with doubling waits and tells failed once, after its attempts', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<object>(name, redis));
    const triedAt: number[] = [];
    const worker = track(
      new BullJobWorker<object>(
        name,
        redis,
        async () => {
          triedAt.push(Date.now());
          throw new Error('disk unplugged');
        },
        { retryBaseMs: 200 },
      ),
    );
    const failures: [Job<object>, Error][] = [];
    const failed = new Promise<void>((r) =>
      worker.on('failed', (job, err) => {
        failures.push([job, err]);
        r();
      }),
    );
    await worker.start();
    await queue.add('doomed', {}, { attempts: 3 });
    await failed;
    expect(triedAt).toHaveLength(3);
    // The waits between tries: at least 200 ms, then at least 400 ms (lower bounds only: a busy machine waits longer).
    expect(triedAt[1]! - triedAt[0]!).toBeGreaterThanOrEqual(200);
    expect(triedAt[2]! - triedAt[1]!).toBeGreaterThanOrEqual(400);
    expect(failures).toHaveLength(1);
    const [job, err] = failures[0]!;
    expect(job.attemptsMade).toBe(3);
    expect(err.message).toBe('disk unplugged');
    expect(await queue.getJobCounts()).toMatchObject({ failed: 1, waiting: 0, active: 0 });
  });

  it('when a try fails and the next succeeds then only completed is told', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<object>(name, redis));
    let tries = 0;
    const worker = track(
      new BullJobWorker<object>(
        name,
        redis,
        async () => {
          if (++tries === 1) throw new Error('archive busy');
          return 'stored';
        },
        { retryBaseMs: 50 },
      ),
    );
    const failed: string[] = [];
    worker.on('failed', (job) => failed.push(job.id));
    const completed = new Promise<[Job<object>, unknown]>((r) =>
      worker.on('completed', (job, res) => r([job, res])),
    );
    await worker.start();
    await queue.add('flaky', {});
    const [job, result] = await completed;
    expect(result).toBe('stored');
    expect(job.data).toEqual({});
    expect(tries).toBe(2);
    expect(failed).toEqual([]);
    expect(await queue.getJobCounts()).toMatchObject({ completed: 1, failed: 0 });
  });

  it('when two workers share a queue then every job runs once', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<{ n: number }>(name, redis));
    const runs = new Map<number, string[]>();
    const total = 40;
    let completed = 0;
    let allDone!: () => void;
    const done = new Promise<void>((r) => (allDone = r));
    for (const who of ['one', 'two']) {
      const worker = track(
        new BullJobWorker<{ n: number }>(
          name,
          redis,
          async (job) => {
            runs.set(job.data.n, [...(runs.get(job.data.n) ?? []), who]);
            await new Promise((r) => setTimeout(r, 5));
          },
          { concurrency: 2 },
        ),
      );
      worker.on('completed', () => {
        if (++completed === total) allDone();
      });
      await worker.start();
    }
    for (let i = 0; i < total; i++) await queue.add('work', { n: i });
    await done;
    expect([...runs.keys()].sort((a, b) => a - b)).toEqual(Array.from({ length: total }, (_, i) => i));
    expect([...runs.values()].every((who) => who.length === 1)).toBe(true);
    // Both took a share (40 jobs of 5 ms each: neither worker can take them all before the other asks).
    expect(new Set([...runs.values()].flat())).toEqual(new Set(['one', 'two']));
    expect(await queue.getJobCounts()).toMatchObject({ completed: total, active: 0, waiting: 0 });
  });

  it('when the worker holding a job stops renewing its hold (a dead process) then another takes the job over', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<{ n: number }>(name, redis));
    // The doomed worker: BullMQ's own, with a short hold, whose processor never finishes.
    let started!: () => void;
    const taken = new Promise<void>((r) => (started = r));
    const doomed = new Worker(
      name,
      () => {
        started();
        return new Promise(() => undefined);
      },
      { connection: { url: redis.url }, prefix: redis.prefix, lockDuration: 1000, stalledInterval: 500 },
    );
    doomed.on('error', () => undefined);
    await queue.add('long', { n: 7 });
    await taken;
    // What kill -9 leaves: the job active, its hold no longer renewed.
    await doomed.close(true);
    expect(await queue.getJobCounts()).toMatchObject({ active: 1, completed: 0 });

    const seen: number[] = [];
    const survivor = track(
      new BullJobWorker<{ n: number }>(name, redis, async (job) => void seen.push(job.data.n), {
        stalledIntervalMs: 500,
      }),
    );
    const completed = new Promise<Job<{ n: number }>>((r) => survivor.on('completed', (job) => r(job)));
    await survivor.start();
    const job = await completed;
    expect(job.data).toEqual({ n: 7 });
    expect(seen).toEqual([7]);
    expect(await queue.getJobCounts()).toMatchObject({ active: 0, completed: 1, failed: 0 });
  });

  it('keeps queues apart by name and prefix', async () => {
    const name = queueName();
    const a = track(new BullJobQueue<object>(name, redis));
    const other = testRedisConfig('queue-other');
    const b = track(new BullJobQueue<object>(name, other));
    const c = track(new BullJobQueue<object>(queueName(), redis));
    await a.add('x', {});
    expect((await a.getJobCounts()).waiting).toBe(1);
    expect((await b.getJobCounts()).waiting).toBe(0);
    expect((await c.getJobCounts()).waiting).toBe(0);
    await b.close();
    await removeRedisKeys(other.prefix);
  });

  it('drained is told once nothing is left waiting', async () => {
    const name = queueName();
    const queue = track(new BullJobQueue<object>(name, redis));
    const worker = track(new BullJobWorker<object>(name, redis, async () => undefined));
    for (let i = 0; i < 3; i++) await queue.add('one', {});
    const idle = drained(worker as BullJobWorker<unknown>);
    await worker.start();
    await idle;
    expect(await queue.getJobCounts()).toMatchObject({ waiting: 0 });
  });
});
