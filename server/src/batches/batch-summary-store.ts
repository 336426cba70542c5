import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import { IntakeFile } from '../ingest/intake-file.entity';
import type { BatchResult } from '../analysis';
import { type BatchAnalysisDto, type BatchResultSummary, batchSettingsSchema } from '../contracts/batches';
import type { Batch } from './batch.entity';
import { BatchAnalysisRow } from './batch-analysis.entity';
import { BatchSummaryRow, type SummaryState } from './batch-summary.entity';
import { markTemperatureSystemChanged } from '../temperatures/temperature-systems';

/** The files a batch's analysis reads, as its inputs hash names them. */
export interface HashedFile {
  id: number;
  sha256: string;
}

/**
 * SHA-256 over what a batch's analysis depends on: its settings (as the schema reads them), its layout
 * and manifest versions, and its stored files by id and content. The readings follow from the files.
 */
export function inputsHash(
  batch: Pick<Batch, 'settingsJson' | 'layoutId' | 'layoutVersion' | 'manifestId' | 'manifestVersion'>,
  files: readonly HashedFile[],
): string {
  const settings = batchSettingsSchema.parse(JSON.parse(batch.settingsJson));
  const inputs = {
    settings,
    layout: [batch.layoutId, batch.layoutVersion],
    manifest: [batch.manifestId, batch.manifestVersion],
    files: [...files].sort((a, b) => a.id - b.id).map((f) => [f.id, f.sha256]),
  };
  return createHash('sha256').update(JSON.stringify(inputs)).digest('hex');
}

/** What a stored headline holds, from a result (or nothing, for none and failed). */
export interface SummaryWrite {
  status: SummaryState;
  source: 'analysis' | 'record' | null;
  inputsHash: string | null;
  engineVersion: string | null;
  error: string | null;
  summary: BatchResultSummary | null;
  result: BatchResult | null;
  /** The whole-spectrum analysis of the same inputs; undefined or null: not worked out (yet). */
  spectral?: StoredSpectral | null;
  sampleIds?: readonly string[];
}

/** The whole-spectrum part of a batch's analysis as stored beside its result. */
export type StoredSpectral = Required<Pick<BatchAnalysisDto, 'spectral' | 'spectralError'>>;

/** The row's columns for a write: the headline as JSON, and beside it what lists sort by and Temperatures shows. */
export function summaryColumns(write: SummaryWrite, now: string): Partial<BatchSummaryRow> {
  return {
    status: write.status,
    source: write.source,
    inputsHash: write.inputsHash,
    engineVersion: write.engineVersion,
    analysedAt: now,
    error: write.error,
    summaryJson: write.summary ? JSON.stringify(write.summary) : null,
    qcFlagCount: write.summary?.qcFlagCount ?? null,
    qcErrorCount: write.summary?.qcErrorCount ?? null,
    bestModel: write.summary?.best ?? null,
    k: write.summary?.k ?? null,
    kSe: write.summary?.kSe ?? null,
    kCi95Low: write.summary?.kCi95?.[0] ?? null,
    kCi95High: write.summary?.kCi95?.[1] ?? null,
    kText: write.summary?.kText ?? null,
    ...(write.sampleIds ? { sampleIds: write.sampleIds.join('\n') } : {}),
  };
}

/** The whole stored analysis of a write (in `batch_analyses`, beside the summary row). */
function analysisRow(batchId: number, write: SummaryWrite): BatchAnalysisRow {
  return {
    batchId,
    inputsHash: write.inputsHash,
    engineVersion: write.engineVersion,
    resultJson: write.result ? JSON.stringify(write.result) : null,
    spectralJson: write.spectral ? JSON.stringify(write.spectral) : null,
  };
}

/** The stored files of a batch: how many, and when the last one was stored. */
async function storedFilesOf(
  manager: EntityManager,
  batchId: number,
): Promise<{ count: number; lastFileAt: string | null }> {
  const agg = await manager
    .createQueryBuilder(IntakeFile, 'f')
    .select('COUNT(f.id)', 'n')
    .addSelect('MAX(f.finishedAt)', 'last')
    .where('f.batchId = :batchId AND f.status = :status', { batchId, status: 'stored' })
    .getRawOne<{ n: number | string; last: string | null }>();
  return { count: Number(agg?.n ?? 0), lastFileAt: agg?.last ?? null };
}

/**
 * Reads and writes of `batch_summaries`. Changes mark the row inside their own transaction (`touch`);
 * the analysis writes its headline later, only if no newer change came in between (`writeIfRevision`).
 */
export class BatchSummaryStore {
  constructor(private readonly dataSource: DataSource) {}

  find(batchId: number, manager: EntityManager = this.dataSource.manager): Promise<BatchSummaryRow | null> {
    return manager.findOneBy(BatchSummaryRow, { batchId });
  }

  /**
   * Inside a change's transaction: count the batch's stored files again and note the activity. When the
   * analysis inputs may have changed, the headline becomes pending (kept until the new one is written)
   * and the revision grows, so an analysis of the older inputs no longer lands.
   */
  async touch(
    manager: EntityManager,
    batchId: number,
    options: { inputsChanged: boolean; sampleIds?: readonly string[]; now?: string },
  ): Promise<void> {
    await this.touchRow(manager, batchId, options);
    // A new batch, a state change (approval, reopening) or new files move its system's Temperatures on.
    // Last, as in every writer: the summary row is locked before the system's, so two changes of one batch
    // (a review and a headline written in the background) cannot each hold what the other waits for.
    await markTemperatureSystemChanged(manager, batchId);
  }

  /** `touch`'s own row: made for a new batch, else updated. */
  private async touchRow(
    manager: EntityManager,
    batchId: number,
    options: { inputsChanged: boolean; sampleIds?: readonly string[]; now?: string },
  ): Promise<void> {
    const now = options.now ?? new Date().toISOString();
    const files = await storedFilesOf(manager, batchId);
    const lastActivityAt = files.lastFileAt && files.lastFileAt > now ? files.lastFileAt : now;
    const existing = await this.find(batchId, manager);
    if (!existing) {
      await manager.insert(BatchSummaryRow, {
        batchId,
        revision: 1,
        storedFiles: files.count,
        lastFileAt: files.lastFileAt,
        lastActivityAt,
        sampleIds: (options.sampleIds ?? []).join('\n'),
        status: files.count ? 'pending' : 'none',
        source: null,
        inputsHash: null,
        engineVersion: null,
        analysedAt: null,
        error: null,
        summaryJson: null,
        qcFlagCount: null,
        qcErrorCount: null,
        bestModel: null,
        k: null,
        kSe: null,
        kCi95Low: null,
        kCi95High: null,
        kText: null,
      });
      return;
    }
    const changes: Partial<BatchSummaryRow> = {
      storedFiles: files.count,
      lastFileAt: files.lastFileAt,
      lastActivityAt,
      ...(options.sampleIds ? { sampleIds: options.sampleIds.join('\n') } : {}),
    };
    if (options.inputsChanged) {
      changes.status = files.count ? 'pending' : 'none';
      await manager
        .createQueryBuilder()
        .update(BatchSummaryRow)
        .set({ ...changes, revision: () => 'revision + 1' })
        .where('batch_id = :batchId', { batchId })
        .execute();
    } else {
      await manager.update(BatchSummaryRow, { batchId }, changes);
    }
  }

  /** The whole stored analysis of a batch (result and whole-spectrum part) when it is of these inputs and engine. */
  async analysisOf(batchId: number, of: { inputsHash: string; engineVersion: string }) {
    const row = await this.dataSource.manager.findOneBy(BatchAnalysisRow, { batchId });
    return row && row.inputsHash === of.inputsHash && row.engineVersion === of.engineVersion ? row : null;
  }

  /**
   * Write a headline unless the row changed since `revision` was read, then its whole analysis; true when
   * written. One transaction (on SQLite it waits for its turn; plain statements would join whatever
   * transaction a request has open and fall with its rollback), with the new generation of the batch's
   * chemical system, so Temperatures never keeps an answer that misses this headline.
   */
  async writeIfRevision(batchId: number, revision: number, write: SummaryWrite): Promise<boolean> {
    return this.dataSource.transaction(async (manager) => {
      const res = await manager
        .createQueryBuilder()
        .update(BatchSummaryRow)
        .set(summaryColumns(write, new Date().toISOString()))
        .where('batch_id = :batchId AND revision = :revision', { batchId, revision })
        .execute();
      if (!res.affected) return false;
      await manager.upsert(BatchAnalysisRow, analysisRow(batchId, write), ['batchId']);
      await markTemperatureSystemChanged(manager, batchId);
      return true;
    });
  }

  /** Store the whole-spectrum part beside the stored result of the same inputs and engine, if that is there. */
  async writeSpectral(
    batchId: number,
    of: { inputsHash: string; engineVersion: string },
    spectral: StoredSpectral,
  ): Promise<void> {
    await this.dataSource
      .createQueryBuilder()
      .update(BatchAnalysisRow)
      .set({ spectralJson: JSON.stringify(spectral) })
      .where('batch_id = :batchId AND inputs_hash = :inputsHash AND engine_version = :engineVersion', {
        batchId,
        ...of,
      })
      .execute();
  }

  /** Inside the approval's transaction: the record's headline is the batch's, at once. */
  async writeNow(manager: EntityManager, batchId: number, write: SummaryWrite): Promise<void> {
    await manager
      .createQueryBuilder()
      .update(BatchSummaryRow)
      .set({ ...summaryColumns(write, new Date().toISOString()), revision: () => 'revision + 1' })
      .where('batch_id = :batchId', { batchId })
      .execute();
    await manager.upsert(BatchAnalysisRow, analysisRow(batchId, write), ['batchId']);
    await markTemperatureSystemChanged(manager, batchId);
  }

  /** Batches with no stored summary yet (made before summaries were stored). */
  async missing(): Promise<number[]> {
    const rows = await this.dataSource
      .createQueryBuilder()
      .select('b.id', 'id')
      .from('batches', 'b')
      .leftJoin(BatchSummaryRow, 's', 's.batch_id = b.id')
      .where('s.batch_id IS NULL')
      .orderBy('b.id', 'DESC')
      .getRawMany<{ id: number }>();
    return rows.map((r) => Number(r.id));
  }

  /** Batches whose headline waits for an analysis: pending, or computed by another engine than this one. */
  async toRefresh(engineVersion: string): Promise<number[]> {
    const rows = await this.dataSource
      .createQueryBuilder(BatchSummaryRow, 's')
      .select('s.batch_id', 'id')
      .where("s.status = 'pending'")
      .orWhere("s.source = 'analysis' AND s.engine_version <> :engineVersion", { engineVersion })
      .orderBy('s.last_activity_at', 'DESC')
      .getRawMany<{ id: number }>();
    return rows.map((r) => Number(r.id));
  }

  /** The stored headlines of some batches (the Overview): one query. */
  async ofBatches(
    ids: readonly number[],
  ): Promise<Map<number, { status: SummaryState; summary: BatchResultSummary | null }>> {
    if (!ids.length) return new Map();
    const rows = await this.dataSource
      .createQueryBuilder(BatchSummaryRow, 's')
      .select(['s.batchId', 's.status', 's.summaryJson'])
      .where('s.batch_id IN (:...ids)', { ids })
      .getMany();
    return new Map(
      rows.map((r) => [
        r.batchId,
        {
          status: r.status,
          summary: r.summaryJson ? (JSON.parse(r.summaryJson) as BatchResultSummary) : null,
        },
      ]),
    );
  }
}
