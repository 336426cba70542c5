import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/** Instrument profiles, received files, readings and the persistent job queue. */
export class Ingestion1764610000000 implements MigrationInterface {
  name = 'Ingestion1764610000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const timestamp = String(queryRunner.connection.driver.mappedDataTypes.createDate);
    const real = queryRunner.connection.driver.options.type === 'postgres' ? 'double precision' : 'real';
    await queryRunner.createTable(
      new Table({
        name: 'instrument_profiles',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'name', type: 'varchar', length: '120', isUnique: true },
          { name: 'kind', type: 'varchar', length: '40' },
          { name: 'plate_format', type: 'varchar', length: '10' },
          { name: 'file_format', type: 'varchar', length: '20' },
          { name: 'rules_json', type: 'text' },
          { name: 'path_length_cm', type: real, isNullable: true },
          { name: 'fill_volume_ul', type: real, isNullable: true },
          { name: 'well_diameter_mm', type: real, isNullable: true },
          { name: 'default_wavelength_nm', type: real, isNullable: true },
          { name: 'drop_subfolder', type: 'varchar', length: '80', isUnique: true },
          { name: 'file_name_pattern', type: 'varchar', length: '200', isNullable: true },
          { name: 'active', type: 'boolean', default: true },
          { name: 'token_hash', type: 'varchar', length: '64', isNullable: true, isUnique: true },
          { name: 'token_prefix', type: 'varchar', length: '16', isNullable: true },
          { name: 'token_created_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'created_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
          { name: 'updated_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'intake_files',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'profile_id', type: 'integer', isNullable: true },
          { name: 'original_name', type: 'varchar', length: '255' },
          { name: 'sha256', type: 'varchar', length: '64' },
          { name: 'content_key', type: 'varchar', length: '64', isNullable: true, isUnique: true },
          { name: 'size_bytes', type: 'integer' },
          { name: 'status', type: 'varchar', length: '12' },
          { name: 'duplicate_of_id', type: 'integer', isNullable: true },
          { name: 'error', type: 'text', isNullable: true },
          { name: 'warnings', type: 'text', isNullable: true },
          { name: 'run_id', type: 'varchar', length: '120', isNullable: true },
          { name: 'reading_count', type: 'integer', default: 0 },
          { name: 'source', type: 'varchar', length: '10' },
          { name: 'source_path', type: 'varchar', length: '500', isNullable: true },
          { name: 'uploaded_by_id', type: 'integer', isNullable: true },
          { name: 'job_id', type: 'integer', isNullable: true },
          { name: 'received_at', type: 'varchar', length: '30' },
          { name: 'finished_at', type: 'varchar', length: '30', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['profile_id'],
            referencedTableName: 'instrument_profiles',
            referencedColumnNames: ['id'],
            onDelete: 'SET NULL',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'intake_files',
      new TableIndex({ name: 'idx_intake_files_status', columnNames: ['status'] }),
    );
    await queryRunner.createIndex(
      'intake_files',
      new TableIndex({ name: 'idx_intake_files_sha256', columnNames: ['sha256'] }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'readings',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'intake_file_id', type: 'integer' },
          { name: 'position', type: 'varchar', length: '8' },
          { name: 'wavelength_nm', type: real },
          { name: 'absorbance', type: real, isNullable: true },
          { name: 'flag', type: 'varchar', length: '12', isNullable: true },
          { name: 'read_time', type: 'varchar', length: '40', isNullable: true },
          { name: 'temperature_c', type: real, isNullable: true },
          { name: 'replicate', type: 'integer', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['intake_file_id'],
            referencedTableName: 'intake_files',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'readings',
      new TableIndex({ name: 'idx_readings_intake_file', columnNames: ['intake_file_id'] }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'jobs',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'queue', type: 'varchar', length: '60' },
          { name: 'name', type: 'varchar', length: '60' },
          { name: 'data', type: 'text' },
          { name: 'status', type: 'varchar', length: '12' },
          { name: 'attempts_made', type: 'integer', default: 0 },
          { name: 'max_attempts', type: 'integer', default: 3 },
          { name: 'failed_reason', type: 'text', isNullable: true },
          { name: 'created_at', type: 'bigint' },
          { name: 'finished_at', type: 'bigint', isNullable: true },
        ],
      }),
    );
    await queryRunner.createIndex(
      'jobs',
      new TableIndex({ name: 'idx_jobs_queue_status', columnNames: ['queue', 'status'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    for (const table of ['jobs', 'readings', 'intake_files', 'instrument_profiles'])
      await queryRunner.dropTable(table);
  }
}
