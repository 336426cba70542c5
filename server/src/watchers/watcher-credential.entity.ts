import { Column, Entity, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';

/**
 * A drop-folder watcher's credential: one per watcher installation. It reads the active profiles' drop
 * folders, sends files for any of them and reports itself. Only the token's SHA-256 is stored.
 */
@Entity('watcher_credentials')
export class WatcherCredential {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 80, unique: true })
  name!: string;

  @Column('varchar', { name: 'token_hash', length: 64, unique: true })
  tokenHash!: string;

  @Column('varchar', { name: 'token_prefix', length: 16 })
  tokenPrefix!: string;

  @Column('integer', { name: 'created_by_id', nullable: true })
  createdById!: number | null;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;

  @Column('varchar', { name: 'revoked_at', length: 30, nullable: true })
  revokedAt!: string | null;

  /** From its last report: when, its version, its computer's name and the folders it watches (JSON list). */
  @Column('varchar', { name: 'last_seen_at', length: 30, nullable: true })
  lastSeenAt!: string | null;

  @Column('varchar', { length: 40, nullable: true })
  version!: string | null;

  @Column('varchar', { length: 120, nullable: true })
  hostname!: string | null;

  @Column('text', { name: 'folders_json', nullable: true })
  foldersJson!: string | null;
}

/** Per instrument profile: the last report of a watcher watching its drop folder. */
@Entity('instrument_presence')
export class InstrumentPresence {
  @PrimaryColumn('integer', { name: 'profile_id' })
  profileId!: number;

  /** The watcher credential's name, or "instrument token" for a watcher configured with per-folder tokens. */
  @Column('varchar', { name: 'watcher_name', length: 80 })
  watcherName!: string;

  @Column('integer', { name: 'watcher_id', nullable: true })
  watcherId!: number | null;

  @Column('varchar', { length: 40, nullable: true })
  version!: string | null;

  @Column('varchar', { length: 120, nullable: true })
  hostname!: string | null;

  @Column('varchar', { name: 'last_seen_at', length: 30 })
  lastSeenAt!: string;

  /** Set when the "silent" mail went out; cleared (with a "back" mail) by the next report. */
  @Column('varchar', { name: 'silent_notified_at', length: 30, nullable: true })
  silentNotifiedAt!: string | null;
}
