import { type MigrationInterface, type QueryRunner, Table, TableColumn, TableIndex } from 'typeorm';

/** Audit trail, versioned layouts and manifests, batches, and the batch of each received file. */
export class Batches1764620000000 implements MigrationInterface {
  name = 'Batches1764620000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const timestamp = String(queryRunner.connection.driver.mappedDataTypes.createDate);
    const real = queryRunner.connection.driver.options.type === 'postgres' ? 'double precision' : 'real';
    const id = {
      name: 'id',
      type: 'integer',
      isPrimary: true,
      isGenerated: true,
      generationStrategy: 'increment' as const,
    };
    const stamps = [
      { name: 'created_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
      { name: 'updated_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
    ];
    await queryRunner.createTable(
      new Table({
        name: 'audit_entries',
        columns: [
          id,
          { name: 'at', type: 'varchar', length: '30' },
          { name: 'actor_id', type: 'integer', isNullable: true },
          { name: 'actor_name', type: 'varchar', length: '254' },
          { name: 'action', type: 'varchar', length: '30' },
          { name: 'entity', type: 'varchar', length: '30' },
          { name: 'entity_id', type: 'integer' },
          { name: 'summary', type: 'text' },
          { name: 'before_json', type: 'text', isNullable: true },
          { name: 'after_json', type: 'text', isNullable: true },
          { name: 'reason', type: 'text', isNullable: true },
        ],
      }),
    );
    await queryRunner.createIndex(
      'audit_entries',
      new TableIndex({ name: 'idx_audit_entity', columnNames: ['entity', 'entity_id'] }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'layouts',
        columns: [
          id,
          { name: 'name', type: 'varchar', length: '120', isUnique: true },
          { name: 'format', type: 'varchar', length: '10' },
          { name: 'cuvette_count', type: 'integer', isNullable: true },
          { name: 'current_version', type: 'integer' },
          ...stamps,
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'layout_versions',
        columns: [
          id,
          { name: 'layout_id', type: 'integer' },
          { name: 'version', type: 'integer' },
          { name: 'positions_json', type: 'text' },
          { name: 'created_by_id', type: 'integer', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [
          { columnNames: ['layout_id'], referencedTableName: 'layouts', referencedColumnNames: ['id'] },
        ],
      }),
    );
    await queryRunner.createIndex(
      'layout_versions',
      new TableIndex({ name: 'uq_layout_versions', columnNames: ['layout_id', 'version'], isUnique: true }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'manifests',
        columns: [
          id,
          { name: 'name', type: 'varchar', length: '120', isUnique: true },
          { name: 'layout_id', type: 'integer' },
          { name: 'current_version', type: 'integer' },
          ...stamps,
        ],
        foreignKeys: [
          { columnNames: ['layout_id'], referencedTableName: 'layouts', referencedColumnNames: ['id'] },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'manifest_versions',
        columns: [
          id,
          { name: 'manifest_id', type: 'integer' },
          { name: 'version', type: 'integer' },
          { name: 'layout_version', type: 'integer' },
          { name: 'samples_json', type: 'text' },
          { name: 'source', type: 'varchar', length: '10' },
          { name: 'file_name', type: 'varchar', length: '255', isNullable: true },
          { name: 'created_by_id', type: 'integer', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [
          { columnNames: ['manifest_id'], referencedTableName: 'manifests', referencedColumnNames: ['id'] },
        ],
      }),
    );
    await queryRunner.createIndex(
      'manifest_versions',
      new TableIndex({
        name: 'uq_manifest_versions',
        columnNames: ['manifest_id', 'version'],
        isUnique: true,
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'batches',
        columns: [
          id,
          { name: 'name', type: 'varchar', length: '120' },
          { name: 'state', type: 'varchar', length: '10' },
          { name: 'profile_id', type: 'integer' },
          { name: 'layout_id', type: 'integer' },
          { name: 'layout_version', type: 'integer' },
          { name: 'manifest_id', type: 'integer' },
          { name: 'manifest_version', type: 'integer' },
          { name: 'run_id', type: 'varchar', length: '120' },
          { name: 'expected_files', type: 'integer' },
          { name: 'system_name', type: 'varchar', length: '120', isNullable: true },
          { name: 'temperature_c', type: real, isNullable: true },
          { name: 'settings_json', type: 'text' },
          { name: 'created_by_id', type: 'integer', isNullable: true },
          { name: 'reviewed_by_id', type: 'integer', isNullable: true },
          { name: 'reviewed_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'approved_by_id', type: 'integer', isNullable: true },
          { name: 'approved_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'approval_comment', type: 'text', isNullable: true },
          ...stamps,
        ],
        foreignKeys: [
          {
            columnNames: ['profile_id'],
            referencedTableName: 'instrument_profiles',
            referencedColumnNames: ['id'],
          },
          { columnNames: ['layout_id'], referencedTableName: 'layouts', referencedColumnNames: ['id'] },
          { columnNames: ['manifest_id'], referencedTableName: 'manifests', referencedColumnNames: ['id'] },
        ],
      }),
    );
    await queryRunner.createIndex(
      'batches',
      new TableIndex({ name: 'idx_batches_run', columnNames: ['profile_id', 'run_id', 'state'] }),
    );
    await queryRunner.addColumn(
      'intake_files',
      new TableColumn({ name: 'batch_id', type: 'integer', isNullable: true }),
    );
    await queryRunner.createIndex(
      'intake_files',
      new TableIndex({ name: 'idx_intake_files_batch', columnNames: ['batch_id'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('intake_files', 'idx_intake_files_batch');
    await queryRunner.dropColumn('intake_files', 'batch_id');
    for (const table of [
      'batches',
      'manifest_versions',
      'manifests',
      'layout_versions',
      'layouts',
      'audit_entries',
    ]) {
      await queryRunner.dropTable(table);
    }
  }
}
