import { type MigrationInterface, type QueryRunner, TableColumn, TableIndex } from 'typeorm';

/** Which person a session belongs to, so a password reset can end that person's other sessions. */
export class SessionOwnerHardenA1764700001000 implements MigrationInterface {
  name = 'SessionOwnerHardenA1764700001000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.addColumn(
      'sessions',
      new TableColumn({ name: 'user_id', type: 'integer', isNullable: true }),
    );
    await queryRunner.createIndex(
      'sessions',
      new TableIndex({ name: 'idx_sessions_user_id', columnNames: ['user_id'] }),
    );
    // Sessions from before this column: read the owner from the stored session data.
    const rows: { sid: string; data: string }[] = await queryRunner.query('SELECT sid, data FROM sessions');
    for (const row of rows) {
      let userId: unknown;
      try {
        userId = (JSON.parse(row.data) as { passport?: { user?: unknown } }).passport?.user;
      } catch {
        userId = undefined;
      }
      if (typeof userId === 'number')
        await queryRunner.manager
          .createQueryBuilder()
          .update('sessions')
          .set({ user_id: userId })
          .where('sid = :sid', { sid: row.sid })
          .execute();
    }
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropIndex('sessions', 'idx_sessions_user_id');
    await queryRunner.dropColumn('sessions', 'user_id');
  }
}
