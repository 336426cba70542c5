import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** One express-session session, kept in the database so a restart signs nobody out. */
@Entity('sessions')
export class SessionRow {
  @PrimaryColumn('varchar', { length: 128 })
  sid!: string;

  @Index('idx_sessions_expires_at')
  @Column('bigint', { name: 'expires_at' })
  expiresAt!: number;

  @Column('text')
  data!: string;

  /** The signed-in person (from passport's session data); null before sign-in. */
  @Index('idx_sessions_user_id')
  @Column('integer', { name: 'user_id', nullable: true })
  userId!: number | null;
}
