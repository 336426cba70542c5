import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/** The stand-in's outbox, per-person notification settings, and which batch notices went out. */
export class Mail1764630000000 implements MigrationInterface {
  name = 'Mail1764630000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const id = {
      name: 'id',
      type: 'integer',
      isPrimary: true,
      isGenerated: true,
      generationStrategy: 'increment' as const,
    };
    await queryRunner.createTable(
      new Table({
        name: 'outbox_messages',
        columns: [
          id,
          { name: 'from_address', type: 'text' },
          { name: 'to_address', type: 'text' },
          { name: 'subject', type: 'text' },
          { name: 'text_body', type: 'text', isNullable: true },
          { name: 'html_body', type: 'text', isNullable: true },
          { name: 'raw_size', type: 'integer' },
          { name: 'received_at', type: 'varchar', length: '30' },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'notification_settings',
        columns: [
          { name: 'user_id', type: 'integer', isPrimary: true },
          { name: 'batch_complete', type: 'boolean', default: true },
          { name: 'qc_failure', type: 'boolean', default: true },
          { name: 'batch_approved', type: 'boolean', default: true },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [
          {
            columnNames: ['user_id'],
            referencedTableName: 'users',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'batch_notices',
        columns: [
          id,
          { name: 'batch_id', type: 'integer' },
          { name: 'kind', type: 'varchar', length: '30' },
          { name: 'sent_at', type: 'varchar', length: '30' },
        ],
      }),
    );
    await queryRunner.createIndex(
      'batch_notices',
      new TableIndex({ name: 'uq_batch_notices', columnNames: ['batch_id', 'kind'], isUnique: true }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('batch_notices', 'uq_batch_notices');
    for (const table of ['batch_notices', 'notification_settings', 'outbox_messages']) {
      await queryRunner.dropTable(table);
    }
  }
}
