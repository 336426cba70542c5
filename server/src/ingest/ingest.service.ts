import type { IngestReceipt, IntakeFileDto } from '../contracts/intake';
import path from 'node:path';
import {
  type DataSource,
  type EntityManager,
  In,
  IsNull,
  Not,
  type Repository,
  type SelectQueryBuilder,
} from 'typeorm';
import { AppError } from '../common/app-error';
import { cleanFileName } from '../common/file-name';
import { SerialRunner } from '../common/serial';
import { bulkInsert } from '../database/bulk-insert';
import { totalBeside, withCountBeside } from '../database/count-beside';
import type { EventBus } from '../events/event-bus';
import { parseRulesOf, runIdFromFileName } from '../instruments/instruments.service';
import { ParseError } from '../parsers';
import type { Job, JobQueue } from '../queue/job-queue';
import { parseFile, READING_COLUMNS, rowValues, type StoreTarget } from '../workers';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { type Archive, sha256Hex } from './archive';
import { IntakeFile, type IntakeSource, type IntakeStatus } from './intake-file.entity';
import { ReadingRow } from './reading.entity';

export interface IngestJobData {
  intakeFileId: number;
}

/** Finds the batch a stored file belongs to, inside the storing transaction; null leaves it unassigned. */
export type BatchMatcher = (
  manager: EntityManager,
  profileId: number,
  runId: string | null,
) => Promise<number | null>;

/** What the batches feature does when a file is stored in a batch: in the transaction, and after the commit. */
export interface BatchStoreHooks {
  stored(manager: EntityManager, batchId: number): Promise<void>;
  committed(batchId: number): void;
}

export interface ReceivedFile {
  content: Buffer;
  originalName: string;
  profile: InstrumentProfile;
  source: IntakeSource;
  uploadedById?: number;
  sourcePath?: string;
}

export type { IngestReceipt, IntakeFileDto } from '../contracts/intake';

const FINAL: readonly IntakeStatus[] = ['stored', 'duplicate', 'quarantined', 'unassigned'];
const OPEN: readonly IntakeStatus[] = ['queued', 'parsing'];
/** Thrown inside the storing transaction when another job stored the file first: rolls back this one's work. */
class StoredElsewhere extends Error {}

/** A display name from whatever the sender called the file: last path segment, printable, bounded. */
export function displayName(name: string | undefined): string {
  const base = path.posix.basename(path.win32.basename(String(name ?? '')));
  // eslint-disable-next-line no-control-regex
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim();
  return (clean || 'unnamed').slice(0, 200);
}

/** A download name: the display name without hidden formatting, quotes or separators; never a path. */
export function downloadName(name: string): string {
  const clean = cleanFileName(displayName(name)).replace(/["\\/:*?<>|]/g, '_');
  return clean && clean !== '.' && clean !== '..' ? clean : 'raw-file';
}

/** From a received file to stored readings: archive, record, queue, parse, store in one transaction. */
export class IngestService {
  private readonly files: Repository<IntakeFile>;
  private readonly serial = new SerialRunner();
  private matchBatch: BatchMatcher = async () => null;
  private batchHooks: BatchStoreHooks | null = null;

  constructor(
    private readonly dataSource: DataSource,
    private readonly archive: Archive,
    private readonly queue: JobQueue<IngestJobData>,
    private readonly events: EventBus,
  ) {
    this.files = dataSource.getRepository(IntakeFile);
  }

  /** Set once at start-up, when the batches feature is wired in. */
  useBatchMatcher(matcher: BatchMatcher, hooks?: BatchStoreHooks): void {
    this.matchBatch = matcher;
    this.batchHooks = hooks ?? null;
  }

  /**
   * Archive the raw bytes, then record the file (or a duplicate of an earlier one) and queue it.
   * Nothing is recorded when the archive write fails, so the sender keeps the file and retries.
   */
  async receive(file: ReceivedFile): Promise<IngestReceipt> {
    const sha256 = sha256Hex(file.content);
    try {
      await this.archive.store(sha256, file.content);
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      const unavailable = new AppError(
        'storage_unavailable',
        code === 'ENOSPC' ? 507 : 503,
        code === 'ENOSPC'
          ? 'The server has no disk space left for the archive; nothing was stored. Send the file again later.'
          : 'The archive could not be written; nothing was stored. Send the file again later.',
      );
      unavailable.cause = err; // logged by the error handler (5xx), not sent
      throw unavailable;
    }
    const receipt = await this.serial.run(async () => {
      const original = await this.files.findOneBy({ contentKey: sha256 });
      const row = this.files.create({
        profileId: file.profile.id,
        originalName: displayName(file.originalName),
        sha256,
        contentKey: original ? null : sha256,
        sizeBytes: file.content.length,
        status: original ? 'duplicate' : 'queued',
        duplicateOfId: original?.id ?? null,
        error: null,
        warnings: null,
        runId: null,
        readingCount: 0,
        source: file.source,
        sourcePath: file.sourcePath ? file.sourcePath.slice(0, 500) : null,
        uploadedById: file.uploadedById ?? null,
        jobId: null,
        batchId: null,
        receivedAt: new Date().toISOString(),
        finishedAt: original ? new Date().toISOString() : null,
      });
      await this.files.insert(row); // fills in row.id
      return row;
    });
    this.events.publish('file.received', {
      id: receipt.id,
      profileId: file.profile.id,
      status: receipt.status,
    });
    if (receipt.status === 'duplicate') {
      this.events.publish('file.duplicate', { id: receipt.id, duplicateOfId: receipt.duplicateOfId });
      return { id: receipt.id, status: 'duplicate', duplicateOfId: receipt.duplicateOfId ?? undefined };
    }
    await this.enqueue(receipt);
    return { id: receipt.id, status: 'queued' };
  }

  private async enqueue(file: IntakeFile): Promise<void> {
    const job = await this.queue.add('parse-and-store', { intakeFileId: file.id });
    await this.files.update({ id: file.id }, { jobId: Number(job.id) });
  }

  /** Files recorded but never queued (a crash between the two steps) get their job now. */
  async recoverUnqueued(): Promise<number> {
    const unqueued = await this.files.find({ where: { status: In(['queued', 'parsing']), jobId: IsNull() } });
    for (const file of unqueued) await this.enqueue(file);
    return unqueued.length;
  }

  /** Put a quarantined file back in the queue (after its profile was fixed). */
  async requeue(id: number): Promise<IntakeFileDto> {
    const file = await this.files.findOneBy({ id });
    if (!file) throw AppError.notFound(`No received file with id ${id}.`);
    if (file.status !== 'quarantined') {
      throw AppError.conflict(`Only quarantined files can be re-queued; this one is ${file.status}.`);
    }
    await this.files.update({ id }, { status: 'queued', error: null, finishedAt: null, jobId: null });
    await this.enqueue({ ...file, status: 'queued' });
    this.events.publish('file.received', { id, profileId: file.profileId, status: 'queued' });
    return this.getDto(id);
  }

  /** The job processor: parse the archived file and store all its readings in one transaction, or quarantine it. */
  async process(job: Job<IngestJobData>): Promise<IntakeStatus> {
    const file = await this.files.findOneBy({ id: job.data.intakeFileId });
    if (!file) return 'quarantined';
    if (FINAL.includes(file.status)) return this.alreadyFinal(file.id); // do not store twice
    const started = await this.files
      .createQueryBuilder()
      .update(IntakeFile)
      .set({ status: 'parsing' })
      .where('id = :id AND status IN (:...open)', { id: file.id, open: OPEN })
      .execute();
    if (!started.affected) return this.alreadyFinal(file.id); // finished by another job meanwhile

    const profile = file.profileId
      ? await this.dataSource.getRepository(InstrumentProfile).findOneBy({ id: file.profileId })
      : null;
    if (!profile)
      return this.quarantine(
        file,
        'The instrument profile of this file no longer exists; assign the file to a profile.',
      );

    let parsed;
    try {
      const content = await this.archive.read(file.sha256);
      // On a worker thread; a very large file's readings are written there too (see workers/tasks.ts).
      parsed = await parseFile(content, file.originalName, parseRulesOf(profile), this.storeTarget(file.id));
    } catch (err) {
      if (err instanceof ParseError) return this.quarantine(file, err.message);
      throw err; // an I/O fault: the queue retries
    }
    const runId =
      runIdFromFileName(profile.fileNamePattern, file.originalName) ?? parsed.metadata.runId ?? null;

    const readings = parsed.readings;
    const stored = await this.dataSource
      .transaction(async (manager) => {
        const batch = await this.matchBatch(manager, profile.id, runId);
        // The final status first, and only while the file has none: a second run of the same file (a job
        // retried after its first run committed) changes nothing and stores nothing.
        const claimed = await manager
          .createQueryBuilder()
          .update(IntakeFile)
          .set({
            status: batch ? 'stored' : 'unassigned',
            batchId: batch,
            readingCount: parsed.readingCount,
            runId: runId ? runId.slice(0, 120) : null,
            warnings: parsed.warnings.length ? JSON.stringify(parsed.warnings) : null,
            error: null,
            finishedAt: new Date().toISOString(),
          })
          .where({ id: file.id, status: Not(In(FINAL)) })
          .execute();
        if (claimed.affected !== 1) throw new StoredElsewhere();
        if (readings) {
          await manager.delete(ReadingRow, { intakeFileId: file.id });
          const rows = Array.from({ length: readings.count }, (_, i) => [file.id, ...rowValues(readings, i)]);
          await bulkInsert(manager, 'readings', ['intake_file_id', ...READING_COLUMNS], rows);
        }
        if (batch) await this.batchHooks?.stored(manager, batch);
        return { batchId: batch };
      })
      .catch((err: unknown) => {
        if (err instanceof StoredElsewhere) return null;
        throw err;
      });
    // Another job stored it first: that job tells the live pages; this one only reports the outcome.
    if (!stored) return (await this.files.findOneBy({ id: file.id }))?.status ?? 'quarantined';
    return this.afterStore({
      id: file.id,
      profileId: profile.id,
      readingCount: parsed.readingCount,
      runId,
      batchId: stored.batchId,
    });
  }

  /** After the storing commit: tell the live pages and let the batch work out its new headline. */
  private afterStore(stored: {
    id: number;
    profileId: number | null;
    readingCount: number;
    runId: string | null;
    batchId: number | null;
  }): IntakeStatus {
    const status = stored.batchId ? 'stored' : 'unassigned';
    this.events.publish('file.stored', { ...stored, status });
    if (stored.batchId) {
      this.events.publish('batch.updated', { id: stored.batchId });
      this.batchHooks?.committed(stored.batchId);
    }
    return status;
  }

  /**
   * A job for a file that is already final stores nothing. A stored file's after-commit work is done
   * again: the process that stored it may have died between its commit and its events.
   */
  private async alreadyFinal(id: number): Promise<IntakeStatus> {
    const now = await this.files.findOneBy({ id });
    if (!now) return 'quarantined';
    if (now.status !== 'stored' && now.status !== 'unassigned') return now.status;
    return this.afterStore({
      id: now.id,
      profileId: now.profileId,
      readingCount: now.readingCount,
      runId: now.runId,
      batchId: now.batchId,
    });
  }

  /** A job that kept failing (an I/O or database fault, not a bad file): keep the file, say so, allow a re-queue. */
  async markFailed(job: Job<IngestJobData>, error: Error): Promise<void> {
    const file = await this.files.findOneBy({ id: job.data.intakeFileId });
    if (!file || FINAL.includes(file.status)) return;
    // Readings a worker wrote before the failure are not kept (they were never visible).
    await this.dataSource.manager.delete(ReadingRow, { intakeFileId: file.id });
    await this.quarantine(
      file,
      `Storing failed after ${job.attemptsMade} tries (${error.message}); no reading of it was kept. Re-queue it once the cause is fixed.`,
    );
  }

  /** SQLite: where a worker may write a large file's readings itself. PostgreSQL: none (stored here). */
  private storeTarget(intakeFileId: number): Omit<StoreTarget, 'minReadings'> | undefined {
    const options = this.dataSource.options;
    if (options.type !== 'better-sqlite3' || typeof options.database !== 'string') return undefined;
    if (options.database === ':memory:') return undefined;
    return { sqliteFile: options.database, intakeFileId };
  }

  private async quarantine(file: IntakeFile, message: string): Promise<IntakeStatus> {
    await this.files.update(
      { id: file.id },
      { status: 'quarantined', error: message, finishedAt: new Date().toISOString() },
    );
    this.events.publish('file.quarantined', { id: file.id, profileId: file.profileId, error: message });
    return 'quarantined';
  }

  /**
   * The archived raw bytes of a received file, by SHA-256, with a download name made from what the
   * sender called it (cleaned; never used as a path).
   */
  async raw(sha256: string): Promise<{ stream: NodeJS.ReadableStream; size: number; fileName: string }> {
    if (!/^[0-9a-f]{64}$/.test(sha256))
      throw AppError.badRequest('Give the file by its SHA-256 (64 hex digits).');
    const file = await this.files.findOne({ where: { sha256 }, order: { id: 'ASC' } });
    if (!file) throw AppError.notFound('No received file has this SHA-256.');
    try {
      const { stream, size } = await this.archive.open(sha256);
      return { stream, size, fileName: downloadName(file.originalName) };
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT')
        throw new AppError(
          'archive_missing',
          410,
          'The archived copy of this file is missing; see the archive check.',
        );
      throw err;
    }
  }

  async getDto(id: number): Promise<IntakeFileDto> {
    const { items } = await this.list({ id });
    if (!items[0]) throw AppError.notFound(`No received file with id ${id}.`);
    return items[0];
  }

  async list(query: IntakeQuery): Promise<{ items: IntakeFileDto[]; total: number }> {
    const filtered = (qb: SelectQueryBuilder<IntakeFile>): SelectQueryBuilder<IntakeFile> => {
      if (query.id !== undefined) qb.andWhere('f.id = :id', { id: query.id });
      if (query.status) qb.andWhere('f.status = :status', { status: query.status });
      if (query.profileId !== undefined)
        qb.andWhere('f.profile_id = :profileId', { profileId: query.profileId });
      if (query.q) {
        qb.andWhere(
          "(LOWER(f.original_name) LIKE :q ESCAPE '\\' OR f.sha256 LIKE :q ESCAPE '\\' OR LOWER(COALESCE(f.run_id, '')) LIKE :q ESCAPE '\\')",
          {
            q: `%${query.q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`,
          },
        );
      }
      return qb;
    };
    // One query: the page, with the count beside it in a subquery that joins nothing (it reads the files
    // alone, from an index of them where one covers the filter).
    const counter = filtered(this.files.createQueryBuilder('f'));
    const qb = withCountBeside(
      filtered(
        this.files
          .createQueryBuilder('f')
          .leftJoin(InstrumentProfile, 'p', 'p.id = f.profile_id')
          .select('f')
          .addSelect('p.name', 'profile_name'),
      ),
      counter,
    );
    const sortColumn = SORT_COLUMNS[query.sort ?? 'receivedAt'];
    qb.orderBy(sortColumn, query.dir === 'asc' ? 'ASC' : 'DESC').addOrderBy(
      'f.id',
      query.dir === 'asc' ? 'ASC' : 'DESC',
    );
    const pageSize = query.pageSize ?? 25;
    qb.offset((query.page ?? 0) * pageSize).limit(pageSize);
    const { entities, raw } = await qb.getRawAndEntities<{
      profile_name?: string | null;
      total: number | string;
    }>();
    const items = entities.map((f, i) => toIntakeDto(f, raw[i]?.profile_name ?? null));
    const total = await totalBeside(raw, counter);
    return { items, total };
  }
}

const SORT_COLUMNS = {
  receivedAt: 'f.received_at',
  finishedAt: 'f.finished_at',
  originalName: 'f.original_name',
  status: 'f.status',
  sizeBytes: 'f.size_bytes',
  readingCount: 'f.reading_count',
} as const;

export interface IntakeQuery {
  id?: number;
  status?: IntakeStatus;
  profileId?: number;
  q?: string;
  sort?: keyof typeof SORT_COLUMNS;
  dir?: 'asc' | 'desc';
  page?: number;
  pageSize?: number;
}

function toIntakeDto(f: IntakeFile, profileName: string | null): IntakeFileDto {
  return {
    id: f.id,
    profileId: f.profileId,
    profileName,
    originalName: f.originalName,
    sha256: f.sha256,
    sizeBytes: f.sizeBytes,
    status: f.status,
    duplicateOfId: f.duplicateOfId,
    error: f.error,
    warnings: f.warnings ? (JSON.parse(f.warnings) as string[]) : [],
    runId: f.runId,
    batchId: f.batchId,
    readingCount: f.readingCount,
    source: f.source,
    receivedAt: f.receivedAt,
    finishedAt: f.finishedAt,
  };
}
