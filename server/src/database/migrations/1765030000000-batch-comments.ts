import { type MigrationInterface, type QueryRunner, Table, TableIndex } from 'typeorm';

/** Comments on batches, threaded one level deep (a reply names the comment that opens its thread). */
export class BatchComments1765030000000 implements MigrationInterface {
  name = 'BatchComments1765030000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'batch_comments',
        columns: [
          {
            name: 'id',
            type: 'integer',
            isPrimary: true,
            isGenerated: true,
            generationStrategy: 'increment',
          },
          { name: 'batch_id', type: 'integer' },
          { name: 'reply_to_id', type: 'integer', isNullable: true },
          { name: 'author_id', type: 'integer', isNullable: true },
          { name: 'author_name', type: 'varchar', length: '120' },
          { name: 'author_role', type: 'varchar', length: '20' },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'text', type: 'text' },
          { name: 'removed_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'removed_by_id', type: 'integer', isNullable: true },
          { name: 'removed_by_name', type: 'varchar', length: '120', isNullable: true },
        ],
        foreignKeys: [
          {
            columnNames: ['batch_id'],
            referencedTableName: 'batches',
            referencedColumnNames: ['id'],
            onDelete: 'CASCADE',
          },
          {
            columnNames: ['reply_to_id'],
            referencedTableName: 'batch_comments',
            referencedColumnNames: ['id'],
          },
          {
            columnNames: ['author_id'],
            referencedTableName: 'users',
            referencedColumnNames: ['id'],
            onDelete: 'SET NULL',
          },
        ],
      }),
    );
    await queryRunner.createIndex(
      'batch_comments',
      new TableIndex({ name: 'idx_batch_comments_batch', columnNames: ['batch_id', 'id'] }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('batch_comments');
  }
}
