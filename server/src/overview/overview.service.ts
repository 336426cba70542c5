import { InstrumentPresence } from '../watchers/watcher-credential.entity';
import { type DataSource, In } from 'typeorm';
import type { BatchResultSummary, BatchesService } from '../batches/batches.service';
import { Batch } from '../batches/batch.entity';
import { IntakeFile } from '../ingest/intake-file.entity';
import { INTAKE_ROLES } from '../ingest/intake.router';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import type { Role } from '../users/user.entity';
import type {
  OverviewBatch,
  OverviewDto,
  OverviewQc,
  OverviewReviewItem,
  OverviewSilentInstrument,
} from './overview.dto';

/** How many batches each list shows (the totals count them all). */
export const OVERVIEW_LIST_SIZE = 10;
/** How many of today's quarantined files are named. */
export const QUARANTINE_LATEST = 5;
/** An active instrument that sent nothing for this long is listed as silent. */
export const SILENT_AFTER_HOURS = 24;

/** Roles that may mark an open batch reviewed, and approve a reviewed one (the batches router's lists). */
const REVIEWERS: readonly Role[] = ['lab_manager', 'scientist'];
const APPROVERS: readonly Role[] = ['lab_manager'];

export interface OverviewViewer {
  id: number;
  role: Role;
}

interface FileAggregate {
  batchId: number;
  storedFiles: number;
  readingCount: number;
  lastFileAt: string | null;
}

/**
 * The Overview: a handful of aggregate queries, no analysis. QC counts are the stored summaries
 * (BatchesService.storedSummaries); a batch whose headline is still being worked out says so.
 */
export class OverviewService {
  constructor(
    private readonly dataSource: DataSource,
    private readonly batches: BatchesService,
    private readonly options: { fourEyesApproval: boolean },
  ) {}

  async overview(viewer: OverviewViewer, since: Date, now = new Date()): Promise<OverviewDto> {
    const m = this.dataSource.manager;
    const open = await m.find(Batch, { where: { state: In(['open', 'reviewed']) } });
    const files = await this.fileAggregates(open.map((b) => b.id));
    const profileNames = await this.profileNames(open.map((b) => b.profileId));
    const summaries = await this.batches.storedSummaries(open.map((b) => b.id));
    const rows = open
      .map((b) => this.toBatch(b, files.get(b.id), profileNames, summaries.get(b.id)))
      .sort((a, b) => b.lastActivityAt.localeCompare(a.lastActivityAt) || b.id - a.id);
    const byId = new Map(open.map((b) => [b.id, b]));
    const awaiting: OverviewReviewItem[] = rows.flatMap((row) => {
      const action = this.actionFor(viewer, byId.get(row.id)!, row);
      return action ? [{ ...row, action }] : [];
    });
    const dto: OverviewDto = {
      role: viewer.role,
      generatedAt: now.toISOString(),
      openBatches: { total: rows.length, items: rows.slice(0, OVERVIEW_LIST_SIZE) },
      awaitingMe: {
        total: awaiting.length,
        items: awaiting.slice(0, OVERVIEW_LIST_SIZE),
        fourEyes: this.options.fourEyesApproval,
      },
    };
    if (INTAKE_ROLES.includes(viewer.role)) {
      dto.quarantinedToday = await this.quarantined(since);
      dto.silentInstruments = {
        silentAfterHours: SILENT_AFTER_HOURS,
        items: await this.silentInstruments(now),
      };
    }
    return dto;
  }

  /** Stored files, readings and the newest stored file per batch: one grouped query. */
  private async fileAggregates(batchIds: number[]): Promise<Map<number, FileAggregate>> {
    if (!batchIds.length) return new Map();
    const raw = await this.dataSource.manager
      .createQueryBuilder(IntakeFile, 'f')
      .select('f.batchId', 'batchId')
      .addSelect('COUNT(f.id)', 'storedFiles')
      .addSelect('COALESCE(SUM(f.readingCount), 0)', 'readingCount')
      .addSelect('MAX(f.finishedAt)', 'lastFileAt')
      .where('f.status = :status', { status: 'stored' })
      .andWhere('f.batchId IN (:...ids)', { ids: batchIds })
      .groupBy('f.batchId')
      .getRawMany<{
        batchId: number;
        storedFiles: number;
        readingCount: number;
        lastFileAt: string | null;
      }>();
    return new Map(
      raw.map((r) => [
        Number(r.batchId),
        {
          batchId: Number(r.batchId),
          storedFiles: Number(r.storedFiles),
          readingCount: Number(r.readingCount),
          lastFileAt: r.lastFileAt ?? null,
        },
      ]),
    );
  }

  private async profileNames(ids: (number | null)[]): Promise<Map<number, string>> {
    const wanted = [...new Set(ids.filter((x): x is number => x !== null))];
    if (!wanted.length) return new Map();
    const profiles = await this.dataSource.manager.find(InstrumentProfile, {
      where: { id: In(wanted) },
      select: { id: true, name: true },
    });
    return new Map(profiles.map((p) => [p.id, p.name]));
  }

  private toBatch(
    b: Batch,
    agg: FileAggregate | undefined,
    names: Map<number, string>,
    stored: { status: string; summary: BatchResultSummary | null } | undefined,
  ): OverviewBatch {
    const updatedAt = new Date(b.updatedAt).toISOString();
    const lastFileAt = agg?.lastFileAt ?? null;
    const storedFiles = agg?.storedFiles ?? 0;
    let qc: OverviewQc = { state: 'no-files', flagCount: null, errorCount: null };
    if (storedFiles > 0) {
      const known = stored?.status === 'current' ? stored.summary : null;
      qc = known
        ? { state: 'known', flagCount: known.qcFlagCount, errorCount: known.qcErrorCount }
        : { state: 'not-analysed', flagCount: null, errorCount: null };
    }
    return {
      id: b.id,
      name: b.name,
      state: b.state,
      profileName: names.get(b.profileId) ?? null,
      expectedFiles: b.expectedFiles,
      storedFiles,
      readingCount: agg?.readingCount ?? 0,
      lastActivityAt: lastFileAt && lastFileAt > updatedAt ? lastFileAt : updatedAt,
      qc,
    };
  }

  /**
   * The step this person may take on the batch now, as the batches router and four-eyes rule allow:
   * mark an open batch with all its expected files reviewed; approve a reviewed batch they neither
   * created nor reviewed (when the lab keeps four eyes).
   */
  private actionFor(viewer: OverviewViewer, b: Batch, row: OverviewBatch): 'review' | 'approve' | null {
    if (
      b.state === 'open' &&
      REVIEWERS.includes(viewer.role) &&
      row.storedFiles >= Math.max(1, b.expectedFiles)
    )
      return 'review';
    if (b.state === 'reviewed' && APPROVERS.includes(viewer.role)) {
      if (this.options.fourEyesApproval && (b.createdById === viewer.id || b.reviewedById === viewer.id))
        return null;
      return 'approve';
    }
    return null;
  }

  private async quarantined(since: Date): Promise<NonNullable<OverviewDto['quarantinedToday']>> {
    const m = this.dataSource.manager;
    const sinceIso = since.toISOString();
    const where = 'f.status = :status AND f.receivedAt >= :since';
    const params = { status: 'quarantined', since: sinceIso };
    const count = await m.createQueryBuilder(IntakeFile, 'f').where(where, params).getCount();
    const latest = await m
      .createQueryBuilder(IntakeFile, 'f')
      .where(where, params)
      .orderBy('f.receivedAt', 'DESC')
      .addOrderBy('f.id', 'DESC')
      .limit(QUARANTINE_LATEST)
      .getMany();
    const names = await this.profileNames(latest.map((f) => f.profileId));
    return {
      since: sinceIso,
      count,
      latest: latest.map((f) => ({
        id: f.id,
        originalName: f.originalName,
        profileName: f.profileId !== null ? (names.get(f.profileId) ?? null) : null,
        receivedAt: f.receivedAt,
        error: f.error,
      })),
    };
  }

  private async silentInstruments(now: Date): Promise<OverviewSilentInstrument[]> {
    const profiles = await this.dataSource.manager.find(InstrumentProfile, {
      where: { active: true },
      select: { id: true, name: true },
      order: { name: 'ASC' },
    });
    const seen = await this.lastSignsOfLife();
    const threshold = new Date(now.getTime() - SILENT_AFTER_HOURS * 3_600_000).toISOString();
    return profiles
      .map((p) => ({ id: p.id, name: p.name, lastSeenAt: seen.get(p.id) ?? null }))
      .filter((p) => p.lastSeenAt === null || p.lastSeenAt < threshold)
      .sort((a, b) => (a.lastSeenAt ?? '').localeCompare(b.lastSeenAt ?? '') || a.name.localeCompare(b.name));
  }

  /**
   * When each instrument last showed it is alive: the newer of the last file it sent (whatever became
   * of it) and the last report of a watcher watching its drop folder.
   */
  private async lastSignsOfLife(): Promise<Map<number, string>> {
    const raw = await this.dataSource.manager
      .createQueryBuilder(IntakeFile, 'f')
      .select('f.profileId', 'profileId')
      .addSelect('MAX(f.receivedAt)', 'lastAt')
      .where('f.profileId IS NOT NULL')
      .groupBy('f.profileId')
      .getRawMany<{ profileId: number; lastAt: string }>();
    const seen = new Map(raw.map((r) => [Number(r.profileId), r.lastAt]));
    for (const p of await this.dataSource.getRepository(InstrumentPresence).find()) {
      const file = seen.get(p.profileId);
      if (!file || p.lastSeenAt > file) seen.set(p.profileId, p.lastSeenAt);
    }
    return seen;
  }
}
