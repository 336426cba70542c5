import { type MigrationInterface, type QueryRunner, Table } from 'typeorm';

/** Watcher credentials (hashed tokens) and, per instrument profile, the last report of its watcher. */
export class Watchers1764900000000 implements MigrationInterface {
  name = 'Watchers1764900000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'watcher_credentials',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'name', type: 'varchar', length: '80', isUnique: true },
          { name: 'token_hash', type: 'varchar', length: '64', isUnique: true },
          { name: 'token_prefix', type: 'varchar', length: '16' },
          { name: 'created_by_id', type: 'integer', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'revoked_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'last_seen_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'version', type: 'varchar', length: '40', isNullable: true },
          { name: 'hostname', type: 'varchar', length: '120', isNullable: true },
          { name: 'folders_json', type: 'text', isNullable: true },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'instrument_presence',
        columns: [
          { name: 'profile_id', type: 'integer', isPrimary: true },
          { name: 'watcher_name', type: 'varchar', length: '80' },
          { name: 'watcher_id', type: 'integer', isNullable: true },
          { name: 'version', type: 'varchar', length: '40', isNullable: true },
          { name: 'hostname', type: 'varchar', length: '120', isNullable: true },
          { name: 'last_seen_at', type: 'varchar', length: '30' },
          { name: 'silent_notified_at', type: 'varchar', length: '30', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['profile_id'],
            referencedTableName: 'instrument_profiles',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
        ],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('instrument_presence');
    await queryRunner.dropTable('watcher_credentials');
  }
}
