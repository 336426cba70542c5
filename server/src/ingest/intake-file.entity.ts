import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

import type { IntakeSource, IntakeStatus } from '../contracts/enums';

export type { IntakeSource, IntakeStatus } from '../contracts/enums';

/** One received file: where it came from, its archived content, and what became of it. */
@Entity('intake_files')
@Index('idx_intake_files_status', ['status'])
@Index('idx_intake_files_received', ['receivedAt', 'id'])
export class IntakeFile {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'profile_id', nullable: true })
  profileId!: number | null;

  /** The file's name as sent, for display only: never used as a path. */
  @Column('varchar', { name: 'original_name', length: 255 })
  originalName!: string;

  @Index('idx_intake_files_sha256')
  @Column('varchar', { length: 64 })
  sha256!: string;

  /** Equals sha256 for the first file with that content and is null for duplicates: the unique index keeps one original. */
  @Column('varchar', { name: 'content_key', length: 64, nullable: true, unique: true })
  contentKey!: string | null;

  @Column('integer', { name: 'size_bytes' })
  sizeBytes!: number;

  @Column('varchar', { length: 12 })
  status!: IntakeStatus;

  @Column('integer', { name: 'duplicate_of_id', nullable: true })
  duplicateOfId!: number | null;

  @Column('text', { nullable: true })
  error!: string | null;

  @Column('text', { nullable: true })
  warnings!: string | null;

  @Column('varchar', { name: 'run_id', length: 120, nullable: true })
  runId!: string | null;

  @Column('integer', { name: 'reading_count', default: 0 })
  readingCount!: number;

  @Column('varchar', { length: 10 })
  source!: IntakeSource;

  @Column('varchar', { name: 'source_path', length: 500, nullable: true })
  sourcePath!: string | null;

  @Column('integer', { name: 'uploaded_by_id', nullable: true })
  uploadedById!: number | null;

  /** The batch this file belongs to; null while unassigned. */
  @Column('integer', { name: 'batch_id', nullable: true })
  batchId!: number | null;

  @Column('integer', { name: 'job_id', nullable: true })
  jobId!: number | null;

  @Column('varchar', { name: 'received_at', length: 30 })
  receivedAt!: string;

  @Column('varchar', { name: 'finished_at', length: 30, nullable: true })
  finishedAt!: string | null;
}
