import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/**
 * Stored batch summaries: what the batches list shows of each batch (files, last activity, sample ids,
 * the analysis headline with its inputs hash and engine version), written when it changes. Rows of
 * batches that exist already are made at start by the server (BatchesService.backfillSummaries).
 */
export class BatchSummaries1765000000000 implements MigrationInterface {
  name = 'BatchSummaries1765000000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const real = queryRunner.connection.driver.options.type === 'postgres' ? 'double precision' : 'real';
    await queryRunner.createTable(
      new Table({
        name: 'batch_summaries',
        columns: [
          { name: 'batch_id', type: 'integer', isPrimary: true },
          { name: 'revision', type: 'integer', default: 0 },
          { name: 'stored_files', type: 'integer', default: 0 },
          { name: 'last_file_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'last_activity_at', type: 'varchar', length: '30' },
          { name: 'sample_ids', type: 'text' },
          { name: 'status', type: 'varchar', length: '10' },
          { name: 'source', type: 'varchar', length: '10', isNullable: true },
          { name: 'inputs_hash', type: 'varchar', length: '64', isNullable: true },
          { name: 'engine_version', type: 'varchar', length: '120', isNullable: true },
          { name: 'analysed_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'error', type: 'text', isNullable: true },
          { name: 'summary_json', type: 'text', isNullable: true },
          { name: 'qc_flag_count', type: 'integer', isNullable: true },
          { name: 'qc_error_count', type: 'integer', isNullable: true },
          { name: 'best_model', type: 'varchar', length: '20', isNullable: true },
          { name: 'k', type: real, isNullable: true },
          // Last: a large value, so reading the columns before it never walks its overflow pages (SQLite).
          { name: 'result_json', type: 'text', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['batch_id'],
            referencedTableName: 'batches',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'batch_summaries',
      new TableIndex({ name: 'idx_batch_summaries_activity', columnNames: ['last_activity_at'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('batch_summaries');
  }
}
