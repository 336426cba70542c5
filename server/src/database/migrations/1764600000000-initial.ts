import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/** People and sessions. Written with the schema builder so it runs on SQLite and PostgreSQL alike. */
export class Initial1764600000000 implements MigrationInterface {
  name = 'Initial1764600000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const timestamp = String(queryRunner.connection.driver.mappedDataTypes.createDate);
    await queryRunner.createTable(
      new Table({
        name: 'users',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'email', type: 'varchar', length: '254', isUnique: true },
          { name: 'display_name', type: 'varchar', length: '120' },
          { name: 'role', type: 'varchar', length: '20' },
          { name: 'password_hash', type: 'varchar', length: '100', isNullable: true },
          { name: 'active', type: 'boolean', default: true },
          { name: 'set_password_token_hash', type: 'varchar', length: '64', isNullable: true },
          { name: 'set_password_expires_at', type: 'bigint', isNullable: true },
          { name: 'created_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
          { name: 'updated_at', type: timestamp, default: 'CURRENT_TIMESTAMP' },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'sessions',
        columns: [
          { name: 'sid', type: 'varchar', length: '128', isPrimary: true },
          { name: 'expires_at', type: 'bigint' },
          { name: 'data', type: 'text' },
        ],
      }),
    );
    await queryRunner.createIndex(
      'sessions',
      new TableIndex({ name: 'idx_sessions_expires_at', columnNames: ['expires_at'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('sessions');
    await queryRunner.dropTable('users');
  }
}
