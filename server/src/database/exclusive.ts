import type { DataSource } from 'typeorm';

/**
 * Runs start-up work that several server processes on one database must not do side by side (the demo
 * seed, the summary backfill): on PostgreSQL under an advisory lock named after the work and the schema,
 * so a second process waits for the first and then finds the work done; on SQLite, where one process
 * owns the file, it simply runs. The lock is a session lock on a connection of its own, released when
 * the work ends (or the process dies: PostgreSQL drops a dead session's locks).
 */
export async function exclusively<T>(
  dataSource: DataSource,
  name: string,
  work: () => Promise<T>,
): Promise<T> {
  if (dataSource.options.type !== 'postgres') return work();
  const [{ schema }] = (await dataSource.query('SELECT current_schema() AS schema')) as { schema: string }[];
  const key = `equilight:${schema}:${name}`;
  const runner = dataSource.createQueryRunner();
  await runner.connect();
  try {
    await runner.query('SELECT pg_advisory_lock(hashtext($1))', [key]);
    try {
      return await work();
    } finally {
      await runner.query('SELECT pg_advisory_unlock(hashtext($1))', [key]);
    }
  } finally {
    await runner.release();
  }
}
