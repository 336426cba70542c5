import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** The shape of the JSON in an approval record; raise it when that shape changes so old records stay readable. */
export const BATCH_RESULT_SCHEMA_VERSION = 1;

/**
 * An approval record: what one approval froze. The batch shows, exports and reports this, never a
 * recomputation. Reopening marks it superseded and keeps it; the next approval adds a new one.
 */
@Entity('batch_results')
export class BatchResultRecord {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'batch_id' })
  batchId!: number;

  @Column('integer', { name: 'schema_version' })
  schemaVersion!: number;

  /** `0.1.0+3f9a0c1e2b4d`: package version and the start of the analysis module's content hash. */
  @Column('varchar', { name: 'engine_version', length: 80 })
  engineVersion!: string;

  @Column('varchar', { name: 'engine_package_version', length: 40 })
  enginePackageVersion!: string;

  @Column('varchar', { name: 'engine_source_sha256', length: 64 })
  engineSourceSha256!: string;

  /** The batch's settings (BatchSettings) as they were. */
  @Column('text', { name: 'settings_json' })
  settingsJson!: string;

  /** The settings exactly as the analysis module took them (AnalysisSettings). */
  @Column('text', { name: 'analysis_settings_json' })
  analysisSettingsJson!: string;

  /** The full analysis result (BatchResult). */
  @Column('text', { name: 'result_json' })
  resultJson!: string;

  /** Every input file: id, name, SHA-256, readings. */
  @Column('text', { name: 'files_json' })
  filesJson!: string;

  @Column('integer', { name: 'approved_by_id', nullable: true })
  approvedById!: number | null;

  @Column('varchar', { name: 'approved_at', length: 30 })
  approvedAt!: string;

  @Column('text', { name: 'approval_comment' })
  approvalComment!: string;

  @Column('varchar', { name: 'superseded_at', length: 30, nullable: true })
  supersededAt!: string | null;

  @Column('integer', { name: 'superseded_by_id', nullable: true })
  supersededById!: number | null;

  @Column('text', { name: 'superseded_reason', nullable: true })
  supersededReason!: string | null;
}
