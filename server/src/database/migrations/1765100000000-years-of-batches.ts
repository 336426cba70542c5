import { type MigrationInterface, type QueryRunner, Table, TableColumn, TableIndex } from 'typeorm';

/**
 * Years of batches. A batch's whole stored analysis (its result, and now its whole-spectrum part, so the
 * batch page no longer fits every spectrum again on each visit) moves from `batch_summaries` to a table
 * of its own: summary rows stay a few hundred bytes, and the batches list, its count and Temperatures read
 * them without walking tens of kB per batch. Intake's default order (newest first) comes from an index
 * instead of a sort of every received file.
 */
export class YearsOfBatches1765100000000 implements MigrationInterface {
  name = 'YearsOfBatches1765100000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'batch_analyses',
        columns: [
          { name: 'batch_id', type: 'integer', isPrimary: true },
          { name: 'inputs_hash', type: 'varchar', length: '64', isNullable: true },
          { name: 'engine_version', type: 'varchar', length: '120', isNullable: true },
          { name: 'result_json', type: 'text', isNullable: true },
          { name: 'spectral_json', type: 'text', isNullable: true },
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
    await queryRunner.query(
      'INSERT INTO batch_analyses (batch_id, inputs_hash, engine_version, result_json) ' +
        'SELECT batch_id, inputs_hash, engine_version, result_json FROM batch_summaries WHERE result_json IS NOT NULL',
    );
    await queryRunner.dropColumn('batch_summaries', 'result_json');
    await queryRunner.createIndex(
      'intake_files',
      new TableIndex({ name: 'idx_intake_files_received', columnNames: ['received_at', 'id'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('intake_files', 'idx_intake_files_received');
    await queryRunner.addColumn(
      'batch_summaries',
      new TableColumn({ name: 'result_json', type: 'text', isNullable: true }),
    );
    await queryRunner.query(
      'UPDATE batch_summaries SET result_json = (SELECT a.result_json FROM batch_analyses a WHERE a.batch_id = batch_summaries.batch_id)',
    );
    await queryRunner.dropTable('batch_analyses');
  }
}
