import type { DataSource, ObjectLiteral, SelectQueryBuilder } from 'typeorm';
import { totalBeside, withCountBeside } from '../database/count-beside';
import { IntakeFile } from '../ingest/intake-file.entity';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { Layout } from '../layouts/layout.entity';
import { Manifest } from '../manifests/manifest.entity';
import { User } from '../users/user.entity';
import {
  type BatchListItemDto,
  type BatchListParams,
  type BatchResultSummary,
  batchSettingsSchema,
} from '../contracts/batches';
import { Batch } from './batch.entity';
import { BatchSummaryRow } from './batch-summary.entity';

/** What each sort key orders by; `nulls` puts batches without the value last in either direction. */
const SORTS: Record<NonNullable<BatchListParams['sort']>, { key: string; nulls?: string }> = {
  lastActivityAt: { key: 's.last_activity_at', nulls: 's.last_activity_at' },
  createdAt: { key: 'b.created_at' },
  name: { key: 'LOWER(b.name)' },
  state: { key: "CASE b.state WHEN 'open' THEN 0 WHEN 'reviewed' THEN 1 ELSE 2 END" },
  instrument: { key: 'LOWER(p.name)', nulls: 'p.name' },
  runId: { key: 'LOWER(b.run_id)' },
  files: { key: 'COALESCE(s.stored_files, 0) * 1.0 / b.expected_files' },
  qc: { key: 's.qc_flag_count', nulls: 's.qc_flag_count' },
  k: { key: 's.k', nulls: 's.k' },
};

/** `%text%` for LIKE, lower case, with the LIKE wildcards of the text itself escaped by a backslash. */
export function likePattern(text: string): string {
  return `%${text.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** What the van 't Hoff fit and the per-temperature groups read of a batch of a chemical system. */
export interface SystemFitRow {
  systemName: string;
  temperatureC: number;
  state: Batch['state'];
  /** The best stoichiometry of its stored headline. */
  model: string | null;
  k: number | null;
}

/** A batch of a chemical system as a page of Temperatures lists it: its K headline from the stored summary. */
export interface SystemPointRow {
  id: number;
  name: string;
  state: Batch['state'];
  temperatureC: number;
  model: string | null;
  k: number | null;
  kSe: number | null;
  kCi95: [number | null, number | null] | null;
  kText: string | null;
}

/** Filters of a batches query beyond paging. */
export interface BatchListFilter {
  id?: number;
  state?: Batch['state'];
  profileId?: number;
  unapproved?: boolean;
  q?: string;
}

/**
 * The batches list as one query (plus one count): each batch with its instrument, layout and manifest
 * names, the names of who created, reviewed and approved it, and its stored summary. Portable SQL through
 * the query builder (SQLite and PostgreSQL).
 */
export class BatchListQueryBuilder {
  constructor(private readonly dataSource: DataSource) {}

  /** The batches and the joins a list shows (set-up and people's names) besides those it filters and sorts on. */
  private base(filter: BatchListFilter): SelectQueryBuilder<Batch> {
    return this.filtered(filter)
      .leftJoin(Layout, 'l', 'l.id = b.layout_id')
      .leftJoin(Manifest, 'm', 'm.id = b.manifest_id')
      .leftJoin(User, 'uc', 'uc.id = b.created_by_id')
      .leftJoin(User, 'ur', 'ur.id = b.reviewed_by_id')
      .leftJoin(User, 'ua', 'ua.id = b.approved_by_id');
  }

  /**
   * The batches the filter lets through, joined to what sorts read (summary, instrument) unless `countOnly`:
   * then only a search joins the summary (its sample ids).
   */
  private filtered(filter: BatchListFilter, countOnly = false): SelectQueryBuilder<Batch> {
    const qb = this.dataSource.createQueryBuilder(Batch, 'b');
    if (!countOnly || filter.q) qb.leftJoin(BatchSummaryRow, 's', 's.batch_id = b.id');
    if (!countOnly) qb.leftJoin(InstrumentProfile, 'p', 'p.id = b.profile_id');
    return this.where(qb, filter);
  }

  /** The filter's conditions on `b` (a batch) and `s` (its summary) of any query that joins both. */
  private where<T extends object>(qb: SelectQueryBuilder<T>, filter: BatchListFilter): SelectQueryBuilder<T> {
    if (filter.id !== undefined) qb.andWhere('b.id = :id', { id: filter.id });
    if (filter.state) qb.andWhere('b.state = :state', { state: filter.state });
    if (filter.profileId !== undefined)
      qb.andWhere('b.profile_id = :profileId', { profileId: filter.profileId });
    if (filter.unapproved) qb.andWhere('b.state <> :approved', { approved: 'approved' });
    if (filter.q) {
      // The files' names through their batch_id index; sample ids from the stored summary.
      const files = this.dataSource
        .createQueryBuilder()
        .select('1')
        .from(IntakeFile, 'f')
        .where("f.batch_id = b.id AND LOWER(f.original_name) LIKE :q ESCAPE '\\'")
        .getQuery();
      qb.andWhere(
        `(LOWER(b.name) LIKE :q ESCAPE '\\' OR LOWER(b.run_id) LIKE :q ESCAPE '\\' OR LOWER(COALESCE(s.sample_ids, '')) LIKE :q ESCAPE '\\' OR EXISTS (${files}))`,
        { q: likePattern(filter.q) },
      );
    }
    return qb;
  }

  /**
   * One page and the total in two queries whatever the page size: the page's ids sorted on the sort key
   * alone, with the count beside them (a subquery that joins nothing it does not filter on: each join is
   * one row per batch at most, so COUNT(*) counts batches), then those few rows in full, by id. No wide
   * column (settings, headline) of every batch goes through the sort, and the full rows are read through
   * the primary key (PostgreSQL would otherwise join every batch before keeping the page's).
   */
  async page(
    filter: BatchListFilter,
    order: { sort?: BatchListParams['sort']; dir?: 'asc' | 'desc'; page?: number; pageSize?: number },
  ): Promise<{ items: BatchListItemDto[]; total: number }> {
    const dir = order.dir === 'asc' ? 'ASC' : 'DESC';
    const sortKey = order.sort ?? 'lastActivityAt';
    const pageSize = order.pageSize ?? 25;
    const window = { offset: (order.page ?? 0) * pageSize, limit: pageSize };
    const counter = this.filtered(filter, true);
    const found = await withCountBeside(
      this.idsQuery(filter, sortKey, dir).offset(window.offset).limit(window.limit),
      counter,
    ).getRawMany<{ id: number | string; total: number | string }>();
    const ids = found.map((r) => Number(r.id));
    const total = await totalBeside(found, counter);
    // The default order reads only batches with a stored summary; those without one come last.
    if (sortKey === 'lastActivityAt' && ids.length < window.limit && window.offset + ids.length < total)
      ids.push(...(await this.unsummarisedIds(filter, dir, window, ids.length)));
    if (!ids.length) return { items: [], total };
    const items = await this.fetch(
      this.rowsQuery(filter, sortKey, dir).andWhere('b.id IN (:...pageIds)', { pageIds: ids }),
    );
    return { items, total };
  }

  /** The batches of a chemical system (or of any) with a temperature; `withSummary`: joined to their summary. */
  private systemBatches(systemName?: string, withSummary = true): SelectQueryBuilder<Batch> {
    const qb = this.dataSource.createQueryBuilder(Batch, 'b');
    if (withSummary) qb.leftJoin(BatchSummaryRow, 's', 's.batch_id = b.id');
    qb.where('b.system_name IS NOT NULL AND b.temperature_c IS NOT NULL');
    if (systemName !== undefined) qb.andWhere('b.system_name = :systemName', { systemName });
    return qb;
  }

  /**
   * Every batch of a chemical system (or of every system) with a temperature, newest (highest id) first: one
   * query of the narrow columns the van 't Hoff fit and the per-temperature groups need (no names, no JSON).
   * The batches' side comes from the index on (system, temperature, state, created) alone, read in its own
   * order; the newest-first order is made here. Asked for by id, SQLite walks the whole batches table
   * instead (settings and all: 16–19 ms instead of 7–8 ms at 10,000 batches on a fresh connection).
   */
  async systemFitRows(systemName?: string): Promise<SystemFitRow[]> {
    const rows = await this.systemBatches(systemName)
      .select('b.id', 'id')
      .addSelect('b.system_name', 'system_name')
      .addSelect('b.temperature_c', 'temperature_c')
      .addSelect('b.state', 'state')
      .addSelect('s.best_model', 'best_model')
      .addSelect('s.k', 'k')
      .orderBy('b.system_name', 'ASC')
      .addOrderBy('b.temperature_c', 'ASC')
      .getRawMany<Record<string, unknown>>();
    return rows
      .map((r) => ({ id: Number(r['id']), r }))
      .sort((x, y) => y.id - x.id)
      .map(({ r }) => ({
        systemName: String(r['system_name']),
        temperatureC: Number(r['temperature_c']),
        state: r['state'] as Batch['state'],
        model: text(r['best_model']),
        k: numberOrNull(r['k']),
      }));
  }

  /**
   * A page of one system's batches by temperature, then id (oldest first), with their K headline. As in
   * the batches list, the page's ids come first from the index alone, then only those rows in full, read
   * by primary key.
   */
  async systemPoints(
    systemName: string,
    window: { offset: number; limit: number },
  ): Promise<SystemPointRow[]> {
    const ids = (
      await this.systemBatches(systemName, false)
        .select('b.id', 'id')
        .orderBy('b.temperature_c', 'ASC')
        .addOrderBy('b.id', 'ASC')
        .offset(window.offset)
        .limit(window.limit)
        .getRawMany<{ id: number | string }>()
    ).map((r) => Number(r.id));
    if (!ids.length) return [];
    const rows = await this.systemBatches()
      .select('b.id', 'id')
      .addSelect('b.name', 'name')
      .addSelect('b.state', 'state')
      .addSelect('b.temperature_c', 'temperature_c')
      .addSelect('s.best_model', 'best_model')
      .addSelect('s.k', 'k')
      .addSelect('s.k_se', 'k_se')
      .addSelect('s.k_ci95_low', 'k_ci95_low')
      .addSelect('s.k_ci95_high', 'k_ci95_high')
      .addSelect('s.k_text', 'k_text')
      .andWhere('b.id IN (:...pageIds)', { pageIds: ids })
      .orderBy('b.temperature_c', 'ASC')
      .addOrderBy('b.id', 'ASC')
      .getRawMany<Record<string, unknown>>();
    return rows.map((r) => {
      const low = numberOrNull(r['k_ci95_low']);
      const high = numberOrNull(r['k_ci95_high']);
      return {
        id: Number(r['id']),
        name: String(r['name']),
        state: r['state'] as Batch['state'],
        temperatureC: Number(r['temperature_c']),
        model: text(r['best_model']),
        k: numberOrNull(r['k']),
        kSe: numberOrNull(r['k_se']),
        // The analysis never gives an interval open at both ends: two nulls are no interval.
        kCi95: low === null && high === null ? null : [low, high],
        kText: text(r['k_text']),
      };
    });
  }

  /** Every batch the filter lets through (one query), in the given order. */
  all(filter: BatchListFilter, order: { sort?: BatchListParams['sort']; dir?: 'asc' | 'desc' } = {}) {
    const dir = order.dir === 'asc' ? 'ASC' : 'DESC';
    return this.fetch(this.rowsQuery(filter, order.sort ?? 'lastActivityAt', dir));
  }

  /**
   * The ids in the list's order, sorted on the sort key alone. The default order (last activity) reads
   * along the summaries' activity index (their batch_id is the tie-break the index already holds), so a
   * page costs its own rows, not a sort of every batch; it holds only batches with a stored summary.
   */
  private idsQuery(
    filter: BatchListFilter,
    sortKey: NonNullable<BatchListParams['sort']>,
    dir: 'ASC' | 'DESC',
  ): SelectQueryBuilder<ObjectLiteral> {
    if (sortKey === 'lastActivityAt')
      return this.withSummary(filter)
        .select('s.batch_id', 'id')
        .orderBy('s.last_activity_at', dir)
        .addOrderBy('s.batch_id', dir);
    return sorted(this.filtered(filter).select('b.id', 'id'), sortKey, dir);
  }

  /** Every column a list item shows, in the given order (the caller narrows it to a page). */
  private rowsQuery(
    filter: BatchListFilter,
    sortKey: NonNullable<BatchListParams['sort']>,
    dir: 'ASC' | 'DESC',
  ): SelectQueryBuilder<Batch> {
    const qb = this.base(filter)
      .select('b')
      .addSelect('p.name', 'profile_name')
      .addSelect('l.name', 'layout_name')
      .addSelect('m.name', 'manifest_name')
      .addSelect('uc.display_name', 'created_by')
      .addSelect('ur.display_name', 'reviewed_by')
      .addSelect('ua.display_name', 'approved_by')
      .addSelect('s.stored_files', 's_stored_files')
      .addSelect('s.last_activity_at', 's_last_activity_at')
      .addSelect('s.status', 's_status')
      .addSelect('s.error', 's_error')
      .addSelect('s.summary_json', 's_summary_json');
    return sorted(qb, sortKey, dir);
  }

  private async fetch(qb: SelectQueryBuilder<Batch>): Promise<BatchListItemDto[]> {
    const { entities, raw } = await qb.getRawAndEntities<Record<string, unknown>>();
    return entities.map((b, i) => toListItem(b, raw[i] ?? {}));
  }

  /** The batches the filter lets through that have a stored summary. */
  private withSummary(filter: BatchListFilter): SelectQueryBuilder<BatchSummaryRow> {
    return this.where(
      this.dataSource.createQueryBuilder(BatchSummaryRow, 's').innerJoin(Batch, 'b', 'b.id = s.batch_id'),
      filter,
    );
  }

  /**
   * The rest of a page in the default order that runs past the batches with a stored summary: those
   * without one (made before summaries were stored, until the start-up backfill reaches them), by id.
   */
  private async unsummarisedIds(
    filter: BatchListFilter,
    dir: 'ASC' | 'DESC',
    window: { offset: number; limit: number },
    found: number,
  ): Promise<number[]> {
    const counted = await this.withSummary(filter)
      .select('COUNT(*)', 'n')
      .getRawOne<{ n: number | string }>();
    const rows = await this.filtered(filter)
      .select('b.id', 'id')
      .andWhere('s.batch_id IS NULL')
      .orderBy('b.id', dir)
      .offset(Math.max(0, window.offset + found - Number(counted?.n ?? 0)))
      .limit(window.limit - found)
      .getRawMany<{ id: number | string }>();
    return rows.map((r) => Number(r.id));
  }
}

/** A batches query in a list order: batches without the sort's value last either way, then by id. */
function sorted(
  qb: SelectQueryBuilder<Batch>,
  sortKey: NonNullable<BatchListParams['sort']>,
  dir: 'ASC' | 'DESC',
): SelectQueryBuilder<Batch> {
  const sort = SORTS[sortKey];
  const nulls = sort.nulls ? `CASE WHEN ${sort.nulls} IS NULL THEN 1 ELSE 0 END` : '0';
  return qb
    .addSelect(nulls, 'sort_nulls')
    .addSelect(sort.key, 'sort_key')
    .orderBy('sort_nulls', 'ASC')
    .addOrderBy('sort_key', dir)
    .addOrderBy('b.id', dir);
}

const text = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));
const numberOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

function toListItem(b: Batch, raw: Record<string, unknown>): BatchListItemDto {
  const updatedAt = new Date(b.updatedAt).toISOString();
  const summaryJson = text(raw['s_summary_json']);
  const status = text(raw['s_status']) as BatchListItemDto['summaryState'] | null;
  return {
    id: b.id,
    name: b.name,
    state: b.state,
    profileId: b.profileId,
    profileName: text(raw['profile_name']),
    layoutId: b.layoutId,
    layoutName: text(raw['layout_name']),
    layoutVersion: b.layoutVersion,
    manifestId: b.manifestId,
    manifestName: text(raw['manifest_name']),
    manifestVersion: b.manifestVersion,
    runId: b.runId,
    expectedFiles: b.expectedFiles,
    fileCount: Number(raw['s_stored_files'] ?? 0),
    systemName: b.systemName,
    temperatureC: b.temperatureC,
    settings: batchSettingsSchema.parse(JSON.parse(b.settingsJson)),
    createdAt: new Date(b.createdAt).toISOString(),
    updatedAt,
    lastActivityAt: text(raw['s_last_activity_at']) ?? updatedAt,
    reviewedBy: text(raw['reviewed_by']),
    reviewedAt: b.reviewedAt,
    approvedBy: text(raw['approved_by']),
    approvedAt: b.approvedAt,
    approvalComment: b.approvalComment,
    createdBy: text(raw['created_by']),
    summary: summaryJson ? (JSON.parse(summaryJson) as BatchResultSummary) : null,
    // A batch made before summaries were stored waits for the start-up backfill.
    summaryState: status ?? 'pending',
    summaryError: text(raw['s_error']),
  };
}
