import { Column, CreateDateColumn, Entity, Index, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

import type { BatchState } from '../contracts/enums';

export type { BatchState } from '../contracts/enums';

/** One run: its instrument, layout and manifest versions, analysis settings, files and review state. */
@Entity('batches')
@Index('idx_batches_system', ['systemName', 'temperatureC', 'state', 'createdAt'])
export class Batch {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 120 })
  name!: string;

  @Column('varchar', { length: 10 })
  state!: BatchState;

  @Column('integer', { name: 'profile_id' })
  profileId!: number;

  @Column('integer', { name: 'layout_id' })
  layoutId!: number;

  @Column('integer', { name: 'layout_version' })
  layoutVersion!: number;

  @Column('integer', { name: 'manifest_id' })
  manifestId!: number;

  @Column('integer', { name: 'manifest_version' })
  manifestVersion!: number;

  /** Files whose run id (from the file name pattern or the file) equals this attach to the batch. */
  @Column('varchar', { name: 'run_id', length: 120 })
  runId!: string;

  @Column('integer', { name: 'expected_files' })
  expectedFiles!: number;

  /** The chemical system, so batches of one system at several temperatures can be compared. */
  @Column('varchar', { name: 'system_name', length: 120, nullable: true })
  systemName!: string | null;

  @Column('double precision', { name: 'temperature_c', nullable: true })
  temperatureC!: number | null;

  /** Analysis settings (AnalysisSettings of the analysis module) as JSON. */
  @Column('text', { name: 'settings_json' })
  settingsJson!: string;

  @Column('integer', { name: 'created_by_id', nullable: true })
  createdById!: number | null;

  @Column('integer', { name: 'reviewed_by_id', nullable: true })
  reviewedById!: number | null;

  @Column('varchar', { name: 'reviewed_at', length: 30, nullable: true })
  reviewedAt!: string | null;

  @Column('integer', { name: 'approved_by_id', nullable: true })
  approvedById!: number | null;

  @Column('varchar', { name: 'approved_at', length: 30, nullable: true })
  approvedAt!: string | null;

  @Column('text', { name: 'approval_comment', nullable: true })
  approvalComment!: string | null;

  @CreateDateColumn({ name: 'created_at' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at' })
  updatedAt!: Date;
}
