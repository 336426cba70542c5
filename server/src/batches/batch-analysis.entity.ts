import { Column, Entity, PrimaryColumn } from 'typeorm';

/**
 * A batch's whole stored analysis: the result the headline comes from and the whole-spectrum part, with
 * the inputs hash and engine they are of (a reader checks these; the whole-spectrum part is added later,
 * outside the headline's transaction). Kept apart from `batch_summaries` so the rows every list and count reads stay small (a
 * result is tens of kB).
 */
@Entity('batch_analyses')
export class BatchAnalysisRow {
  @PrimaryColumn('integer', { name: 'batch_id' })
  batchId!: number;

  @Column('varchar', { name: 'inputs_hash', length: 64, nullable: true })
  inputsHash!: string | null;

  @Column('varchar', { name: 'engine_version', length: 120, nullable: true })
  engineVersion!: string | null;

  /** The whole BatchResult, so the batch page need not analyse again; null for none and failed. */
  @Column('text', { name: 'result_json', nullable: true })
  resultJson!: string | null;

  /**
   * The whole-spectrum analysis, `{ spectral, spectralError }` as JSON (both null when the batch has no
   * spectra); null while not worked out.
   */
  @Column('text', { name: 'spectral_json', nullable: true })
  spectralJson!: string | null;
}
