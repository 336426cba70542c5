import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { DataSource } from 'typeorm';
import { JobRow } from '../../queue/job.entity';
import { openDatabase } from '../data-source';

/** Let other promise chains and timers run, as real I/O inside a transaction would. */
const yieldTurn = () => new Promise((resolve) => setImmediate(resolve));

describe('transactions on the one SQLite connection', () => {
  let dir: string;
  let dataSource: DataSource;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-tx-'));
    dataSource = await openDatabase({ database: { type: 'sqlite', file: path.join(dir, 'tx.sqlite') } });
    await dataSource.query('CREATE TABLE tx_rows (owner TEXT NOT NULL, n INTEGER NOT NULL)');
  });
  afterAll(async () => {
    await dataSource.destroy();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const rowsOf = async (owner: string) =>
    Number((await dataSource.query('SELECT COUNT(*) AS n FROM tx_rows WHERE owner = ?', [owner]))[0].n);

  it('when transactions overlap in time then each commits or rolls back as a whole, on its own', async () => {
    const writer = (owner: string, fail: boolean) =>
      dataSource.transaction(async (manager) => {
        for (let n = 0; n < 5; n++) {
          await manager.query('INSERT INTO tx_rows (owner, n) VALUES (?, ?)', [owner, n]);
          await yieldTurn();
        }
        if (fail) throw new Error(`${owner} gives up`);
      });
    // Repository saves open their own transaction on the runner; they overlap with the others too.
    const saver = (i: number) =>
      dataSource.getRepository(JobRow).save({
        queue: 'tx-test',
        name: `save-${i}`,
        data: '{}',
        status: 'waiting',
        attemptsMade: 0,
        maxAttempts: 1,
        failedReason: null,
        createdAt: Date.now(),
        finishedAt: null,
      });
    const owners = Array.from({ length: 12 }, (_, i) => `w${i}`);
    const results = await Promise.allSettled([
      ...owners.map((owner, i) => writer(owner, i % 4 === 3)),
      ...Array.from({ length: 6 }, (_, i) => saver(i)),
    ]);

    const failures = results
      .slice(0, owners.length)
      .map((r, i) => (r.status === 'rejected' ? `${owners[i]}: ${(r.reason as Error).message}` : null))
      .filter((m) => m !== null);
    // Only the writers meant to fail did, and with their own error (no "transaction within a transaction").
    expect(failures).toEqual(['w3: w3 gives up', 'w7: w7 gives up', 'w11: w11 gives up']);
    for (const [i, owner] of owners.entries()) expect(await rowsOf(owner)).toBe(i % 4 === 3 ? 0 : 5);
    expect(results.slice(owners.length).every((r) => r.status === 'fulfilled')).toBe(true);
    expect(await dataSource.getRepository(JobRow).countBy({ queue: 'tx-test' })).toBe(6);
  });

  it('when a transaction opens another inside its callback then the inner one nests and both land', async () => {
    await dataSource.transaction(async (outer) => {
      await outer.query('INSERT INTO tx_rows (owner, n) VALUES (?, 1)', ['outer']);
      await dataSource.transaction((inner) =>
        inner.query('INSERT INTO tx_rows (owner, n) VALUES (?, 1)', ['inner']),
      );
    });
    expect(await rowsOf('outer')).toBe(1);
    expect(await rowsOf('inner')).toBe(1);
  });
});
