import type Database from 'better-sqlite3';
import type { EntityManager } from 'typeorm';

/**
 * Rows per statement: 8 columns × 500 stays far below both databases' bound-parameter limits. On
 * PostgreSQL one statement of all 1,152 rows of a plate was measured slower than three of 500 (58 vs 75 ms
 * on a busy machine): its parse and plan time grows faster than the row count.
 */
const CHUNK_ROWS = 500;

/**
 * Prepared INSERTs of the app's SQLite connection, by table, columns and row count: compiling a 500-row
 * INSERT costs ~1 ms, and so does writing out its SQL text.
 */
const prepared = new WeakMap<Database.Database, Map<string, Database.Statement>>();

function statement(db: Database.Database, key: string, sql: () => string): Database.Statement {
  let cache = prepared.get(db);
  if (!cache) prepared.set(db, (cache = new Map()));
  let found = cache.get(key);
  if (!found) cache.set(key, (found = db.prepare(sql())));
  return found;
}

function insertSql(
  escape: (name: string) => string,
  table: string,
  columns: readonly string[],
  rowCount: number,
  numbered: boolean,
): string {
  let n = 0;
  const tuples = Array.from(
    { length: rowCount },
    () => `(${columns.map(() => (numbered ? `$${++n}` : '?')).join(', ')})`,
  );
  return `INSERT INTO ${escape(table)} (${columns.map(escape).join(', ')}) VALUES ${tuples.join(', ')}`;
}

/**
 * Insert many rows inside the caller's transaction with multi-row parameterised INSERTs.
 * SQLite: straight on the app's one better-sqlite3 connection (the connection the transaction is open
 * on), with statements prepared once: 500-row chunks, and the rest one row at a time. This skips
 * TypeORM's per-call statement preparation and its promise per statement. PostgreSQL: 500-row statements
 * through the transaction's query runner.
 * Measured on a 1,152-row plate: about 10× faster than TypeORM's insert query builder, which spends its
 * time mapping every value through entity metadata.
 */
export async function bulkInsert(
  manager: EntityManager,
  table: string,
  columns: readonly string[],
  rows: readonly (readonly unknown[])[],
): Promise<void> {
  const driver = manager.connection.driver;
  const escape = (name: string) => driver.escape(name);
  if (driver.options.type === 'better-sqlite3') {
    const db = (driver as unknown as { databaseConnection: Database.Database }).databaseConnection;
    const key = `${table}(${columns.join(',')})`;
    const chunk = statement(db, `${key}×${CHUNK_ROWS}`, () =>
      insertSql(escape, table, columns, CHUNK_ROWS, false),
    );
    const single = statement(db, `${key}×1`, () => insertSql(escape, table, columns, 1, false));
    let start = 0;
    for (; start + CHUNK_ROWS <= rows.length; start += CHUNK_ROWS)
      chunk.run(rows.slice(start, start + CHUNK_ROWS).flat());
    for (; start < rows.length; start++) single.run(rows[start] as unknown[]);
    return;
  }
  const numbered = driver.options.type === 'postgres';
  for (let start = 0; start < rows.length; start += CHUNK_ROWS) {
    const part = rows.slice(start, start + CHUNK_ROWS);
    await manager.query(insertSql(escape, table, columns, part.length, numbered), part.flat());
  }
}
