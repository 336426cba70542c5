import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/**
 * Approval records: what an approval froze (the full result, the settings, the engine version and the
 * SHA-256 of every input file), one row per approval, kept when the batch is reopened.
 */
export class FrozenResults1764648000000 implements MigrationInterface {
  name = 'FrozenResults1764648000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'batch_results',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'batch_id', type: 'integer' },
          { name: 'schema_version', type: 'integer' },
          { name: 'engine_version', type: 'varchar', length: '80' },
          { name: 'engine_package_version', type: 'varchar', length: '40' },
          { name: 'engine_source_sha256', type: 'varchar', length: '64' },
          { name: 'settings_json', type: 'text' },
          { name: 'analysis_settings_json', type: 'text' },
          { name: 'result_json', type: 'text' },
          { name: 'files_json', type: 'text' },
          { name: 'approved_by_id', type: 'integer', isNullable: true },
          { name: 'approved_at', type: 'varchar', length: '30' },
          { name: 'approval_comment', type: 'text' },
          { name: 'superseded_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'superseded_by_id', type: 'integer', isNullable: true },
          { name: 'superseded_reason', type: 'text', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['batch_id'],
            referencedTableName: 'batches',
            referencedColumnNames: ['id'],
            onDelete: 'RESTRICT',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'batch_results',
      new TableIndex({ name: 'idx_batch_results_batch', columnNames: ['batch_id'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('batch_results', 'idx_batch_results_batch');
    await queryRunner.dropTable('batch_results');
  }
}
