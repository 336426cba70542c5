import { type MigrationInterface, type QueryRunner, TableColumn, TableIndex } from 'typeorm';

/** Rows read from `batch_summaries` per step of the backfill. */
const BACKFILL_CHUNK = 500;

/**
 * Temperatures without the whole headline. The parts of K a page of Temperatures shows (standard error,
 * 95 % interval, the K text) get columns of their own in `batch_summaries`, beside `best_model` and `k`,
 * filled here from each row's `summary_json` (parsed in JavaScript: SQLite and PostgreSQL read JSON with
 * different SQL). Batches of a chemical system are found through an index on (system, temperature,
 * state, created): what the fit reads of the batch comes from the index alone, and a page of a system's
 * batches by temperature and id is picked from it before any row is read.
 */
export class TemperatureColumns1765200000000 implements MigrationInterface {
  name = 'TemperatureColumns1765200000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const real = queryRunner.connection.driver.options.type === 'postgres' ? 'double precision' : 'real';
    await queryRunner.addColumns('batch_summaries', [
      new TableColumn({ name: 'k_se', type: real, isNullable: true }),
      new TableColumn({ name: 'k_ci95_low', type: real, isNullable: true }),
      new TableColumn({ name: 'k_ci95_high', type: real, isNullable: true }),
      new TableColumn({ name: 'k_text', type: 'text', isNullable: true }),
    ]);
    await backfill(queryRunner);
    await queryRunner.createIndex(
      'batches',
      new TableIndex({
        name: 'idx_batches_system',
        columnNames: ['system_name', 'temperature_c', 'state', 'created_at'],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('batches', 'idx_batches_system');
    for (const column of ['k_text', 'k_ci95_high', 'k_ci95_low', 'k_se'])
      await queryRunner.dropColumn('batch_summaries', column);
  }
}

/** A number from the stored headline, or null (absent in headlines stored before it was written). */
const numberOrNull = (v: unknown): number | null => (typeof v === 'number' ? v : null);

/** The new columns of every row with a stored headline, from that headline. */
async function backfill(queryRunner: QueryRunner): Promise<void> {
  // Plain SQL with the driver's own placeholders ($1 or ?): a query builder on this table would map it
  // to today's entity, which a later change may no longer match.
  const p = (i: number) => queryRunner.connection.driver.createParameter(`p${i}`, i);
  const update = `UPDATE batch_summaries SET k_se = ${p(0)}, k_ci95_low = ${p(1)}, k_ci95_high = ${p(2)}, k_text = ${p(3)} WHERE batch_id = ${p(4)}`;
  const select = `SELECT batch_id, summary_json FROM batch_summaries WHERE batch_id > ${p(0)} AND summary_json IS NOT NULL ORDER BY batch_id LIMIT ${BACKFILL_CHUNK}`;
  let after = 0;
  for (;;) {
    const rows = (await queryRunner.query(select, [after])) as {
      batch_id: number | string;
      summary_json: string;
    }[];
    if (!rows.length) return;
    for (const row of rows) {
      const headline = JSON.parse(row.summary_json) as Record<string, unknown>;
      const ci = Array.isArray(headline['kCi95']) ? (headline['kCi95'] as unknown[]) : [null, null];
      await queryRunner.query(update, [
        numberOrNull(headline['kSe']),
        numberOrNull(ci[0]),
        numberOrNull(ci[1]),
        typeof headline['kText'] === 'string' ? headline['kText'] : null,
        Number(row.batch_id),
      ]);
    }
    after = Number(rows.at(-1)!.batch_id);
  }
}
