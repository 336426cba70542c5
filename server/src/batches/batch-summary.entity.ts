import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

import type { SummaryState } from '../contracts/batches';

export type { SummaryState } from '../contracts/batches';

/**
 * What the batches list shows of a batch beyond its own row, stored when it changes (a file stored, a
 * setting or exclusion saved, approval, reopening) and never worked out on read: its stored files, last
 * activity, the sample ids it can be found by, and the headline of its analysis with the inputs and the
 * engine it was computed from. `revision` grows with every change, so an analysis that finishes after a
 * newer change does not overwrite what that change marked as pending.
 */
@Entity('batch_summaries')
@Index('idx_batch_summaries_activity', ['lastActivityAt'])
export class BatchSummaryRow {
  @PrimaryColumn('integer', { name: 'batch_id' })
  batchId!: number;

  @Column('integer')
  revision!: number;

  @Column('integer', { name: 'stored_files' })
  storedFiles!: number;

  @Column('varchar', { name: 'last_file_at', length: 30, nullable: true })
  lastFileAt!: string | null;

  /** ISO 8601: the later of the batch's last change and its last stored file. */
  @Column('varchar', { name: 'last_activity_at', length: 30 })
  lastActivityAt!: string;

  /** The sample ids of the batch's manifest version, one per line (searched by the list). */
  @Column('text', { name: 'sample_ids' })
  sampleIds!: string;

  @Column('varchar', { length: 10 })
  status!: SummaryState;

  /** Where the headline came from: the batch's analysis, or its approval record. */
  @Column('varchar', { length: 10, nullable: true })
  source!: 'analysis' | 'record' | null;

  /** SHA-256 over the analysis inputs (settings, files by id and SHA-256, layout and manifest versions). */
  @Column('varchar', { name: 'inputs_hash', length: 64, nullable: true })
  inputsHash!: string | null;

  @Column('varchar', { name: 'engine_version', length: 120, nullable: true })
  engineVersion!: string | null;

  @Column('varchar', { name: 'analysed_at', length: 30, nullable: true })
  analysedAt!: string | null;

  /** Why the analysis of the current inputs fails (status `failed`). */
  @Column('text', { nullable: true })
  error!: string | null;

  /** The headline (BatchResultSummary) as JSON; the columns below repeat what the list sorts by. */
  @Column('text', { name: 'summary_json', nullable: true })
  summaryJson!: string | null;

  @Column('integer', { name: 'qc_flag_count', nullable: true })
  qcFlagCount!: number | null;

  @Column('integer', { name: 'qc_error_count', nullable: true })
  qcErrorCount!: number | null;

  @Column('varchar', { name: 'best_model', length: 20, nullable: true })
  bestModel!: string | null;

  @Column('double precision', { nullable: true })
  k!: number | null;

  /** The rest of K's headline, beside it for Temperatures (which reads it for a page of batches). */
  @Column('double precision', { name: 'k_se', nullable: true })
  kSe!: number | null;

  @Column('double precision', { name: 'k_ci95_low', nullable: true })
  kCi95Low!: number | null;

  @Column('double precision', { name: 'k_ci95_high', nullable: true })
  kCi95High!: number | null;

  @Column('text', { name: 'k_text', nullable: true })
  kText!: string | null;
}
