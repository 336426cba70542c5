import { type MigrationInterface, type QueryRunner, Table } from 'typeorm';

/**
 * Temperatures answered from stored answers. Each chemical system gets a row with a generation (grown by
 * every change to one of its batches) and its answers with the generation they are of; the page reads
 * these rows instead of every batch of every system. Systems named by batches with a temperature today
 * start at generation 1 with no answer yet (worked out on first read).
 */
export class TemperatureSystems1765300000000 implements MigrationInterface {
  name = 'TemperatureSystems1765300000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'temperature_systems',
        columns: [
          { name: 'system_name', type: 'varchar', length: '120', isPrimary: true },
          { name: 'generation', type: 'integer' },
          { name: 'answers_generation', type: 'integer', isNullable: true },
          { name: 'answers_format', type: 'varchar', length: '160', isNullable: true },
          { name: 'answers_json', type: 'text', isNullable: true },
        ],
      }),
    );
    await queryRunner.query(
      'INSERT INTO temperature_systems (system_name, generation) SELECT DISTINCT system_name, 1 FROM batches ' +
        'WHERE system_name IS NOT NULL AND temperature_c IS NOT NULL',
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('temperature_systems');
  }
}
