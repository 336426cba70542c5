import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/** Outbound webhooks: the registered receivers and the log of every delivery to them. */
export class WebhooksBranchWebhooks1764800000000 implements MigrationInterface {
  name = 'WebhooksBranchWebhooks1764800000000';

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
        name: 'webhooks',
        columns: [
          id,
          { name: 'url', type: 'varchar', length: '2048' },
          { name: 'secret_encrypted', type: 'text' },
          { name: 'secret_hint', type: 'varchar', length: '8' },
          { name: 'events_json', type: 'text' },
          { name: 'active', type: 'boolean', default: true },
          { name: 'created_by_id', type: 'integer', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'webhook_deliveries',
        columns: [
          id,
          { name: 'event_id', type: 'varchar', length: '36' },
          { name: 'event', type: 'varchar', length: '30' },
          { name: 'webhook_id', type: 'integer' },
          { name: 'payload', type: 'text' },
          { name: 'status', type: 'varchar', length: '12' },
          { name: 'attempts', type: 'integer', default: 0 },
          { name: 'last_response_code', type: 'integer', isNullable: true },
          { name: 'last_error', type: 'text', isNullable: true },
          { name: 'job_id', type: 'integer', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'last_attempt_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'delivered_at', type: 'varchar', length: '30', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['webhook_id'],
            referencedTableName: 'webhooks',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'webhook_deliveries',
      new TableIndex({
        name: 'uq_webhook_deliveries_event',
        columnNames: ['event_id', 'webhook_id'],
        isUnique: true,
      }),
    );
    await queryRunner.createIndex(
      'webhook_deliveries',
      new TableIndex({ name: 'idx_webhook_deliveries_status', columnNames: ['webhook_id', 'status'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('webhook_deliveries', 'idx_webhook_deliveries_status');
    await queryRunner.dropIndex('webhook_deliveries', 'uq_webhook_deliveries_event');
    await queryRunner.dropTable('webhook_deliveries');
    await queryRunner.dropTable('webhooks');
  }
}
