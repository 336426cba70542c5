import { type DataSource, type EntityManager, In, type Repository } from 'typeorm';
import {
  type AnalysisSettings,
  type BatchResult,
  type KStatus,
  type Reading,
  type SampleDefinition,
  analyzeBatch,
} from '../analysis';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import type { EventBus } from '../events/event-bus';
import { IntakeFile } from '../ingest/intake-file.entity';
import { ReadingRow } from '../ingest/reading.entity';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { Layout } from '../layouts/layout.entity';
import type { LayoutsService } from '../layouts/layouts.service';
import { Manifest } from '../manifests/manifest.entity';
import type { ManifestsService } from '../manifests/manifests.service';
import { User } from '../users/user.entity';
import { Batch, type BatchState } from './batch.entity';
import { type BatchSettings, type CreateBatchInput, batchSettingsSchema } from './batches.schema';

/** The headline of a batch's analysis, for lists: QC flags, the best stoichiometry and its K. */
export interface BatchResultSummary {
  qcFlagCount: number;
  qcErrorCount: number;
  best: string | null;
  /** K of the best candidate when it has a value (not for bounds or failed fits). */
  k: number | null;
  kSe: number | null;
  kCi95: [number | null, number | null] | null;
  kStatus: KStatus | null;
  kLowerBound95: number | null;
  kUpperBound95: number | null;
  kUnit: string | null;
  /** The K as every screen, report and mail states it (formatK). */
  kText: string | null;
}

export interface BatchDto {
  id: number;
  name: string;
  state: BatchState;
  profileId: number;
  profileName: string | null;
  layoutId: number;
  layoutName: string | null;
  layoutVersion: number;
  manifestId: number;
  manifestName: string | null;
  manifestVersion: number;
  runId: string;
  expectedFiles: number;
  fileCount: number;
  systemName: string | null;
  temperatureC: number | null;
  settings: BatchSettings;
  createdAt: string;
  updatedAt: string;
  lastActivityAt: string;
  reviewedBy: string | null;
  reviewedAt: string | null;
  approvedBy: string | null;
  approvedAt: string | null;
  approvalComment: string | null;
  /** Null until a file has arrived. */
  summary: BatchResultSummary | null;
}

/** Everything the analysis needs, so the browser can recompute what-if edits with the same module. */
export interface BatchAnalysisDto {
  batch: BatchDto;
  readings: (Reading & { intakeFileId: number })[];
  samples: SampleDefinition[];
  layoutPositions: { position: string; role: string; replicateGroup?: string }[];
  files: {
    id: number;
    originalName: string;
    sha256: string;
    status: string;
    readingCount: number;
    receivedAt: string;
  }[];
  settings: AnalysisSettings;
  result: BatchResult;
}

/** The headline of an analysis result. */
export function summarize(result: BatchResult): BatchResultSummary {
  const best = result.stoichiometry?.candidates.find((c) => c.model === result.stoichiometry?.best) ?? null;
  const h = result.headline;
  return {
    qcFlagCount: result.qc.filter((f) => f.severity !== 'info').length,
    qcErrorCount: result.qc.filter((f) => f.severity === 'error').length,
    best: result.stoichiometry?.best ?? null,
    k: h?.k ?? null,
    kSe: best?.fit?.kSe ?? null,
    kCi95: h?.kCi95 ?? null,
    kStatus: h?.status ?? null,
    kLowerBound95: h?.kLowerBound95 ?? null,
    kUpperBound95: h?.kUpperBound95 ?? null,
    kUnit: h?.kUnit ?? null,
    kText: h?.text ?? null,
  };
}

/** Batch settings as the analysis module takes them. */
export function toAnalysisSettings(
  settings: BatchSettings,
  overrides: Partial<AnalysisSettings> = {},
): AnalysisSettings {
  return {
    wavelengthNm: settings.wavelengthNm,
    pathLengthCm: settings.pathLengthCm,
    candidates: settings.candidates,
    calibrationModel: settings.calibrationModel,
    linearRangeMaxAbsorbance: settings.linearRangeMaxAbsorbance,
    r2Min: settings.r2Min,
    replicateCvMax: settings.replicateCvMax,
    kCvMax: settings.kCvMax,
    epsilonLPerMolCm: settings.epsilonLPerMolCm,
    exclusions: settings.exclusions,
    monteCarlo: { draws: settings.monteCarloDraws, seed: 1 },
    fitBaseline: settings.fitBaseline,
    ...overrides,
  };
}

/** Batches: creation, files attached by run id, settings, review and approval — all audited. */
export class BatchesService {
  private readonly batches: Repository<Batch>;
  /** Summaries by batch, valid while the batch row and its files are unchanged. */
  private readonly summaries = new Map<number, { key: string; summary: BatchResultSummary }>();

  constructor(
    private readonly dataSource: DataSource,
    private readonly layouts: LayoutsService,
    private readonly manifests: ManifestsService,
    private readonly audit: AuditService,
    private readonly events: EventBus,
  ) {
    this.batches = dataSource.getRepository(Batch);
  }

  async getBatch(id: number): Promise<Batch> {
    const batch = await this.batches.findOneBy({ id });
    if (!batch) throw AppError.notFound(`No batch with id ${id}.`);
    return batch;
  }

  private assertEditable(batch: Batch): void {
    if (batch.state === 'approved')
      throw AppError.conflict(`Batch "${batch.name}" is approved and read-only; reopen it first.`);
  }

  async create(input: CreateBatchInput, actor: Actor): Promise<BatchDto> {
    const profile = await this.dataSource.getRepository(InstrumentProfile).findOneBy({ id: input.profileId });
    if (!profile) throw AppError.badRequest(`No instrument profile with id ${input.profileId}.`);
    const layout = await this.layouts.get(input.layoutId, input.layoutVersion);
    const manifest = await this.manifests.get(input.manifestId, input.manifestVersion);
    if (manifest.layoutId !== layout.id) {
      throw AppError.badRequest(
        `Manifest "${manifest.name}" is mapped onto another layout (id ${manifest.layoutId}), not "${layout.name}".`,
      );
    }
    const layoutFormat = layout.format;
    if (layoutFormat !== profile.plateFormat) {
      throw AppError.badRequest(
        `The layout is for ${layoutFormat === 'cuvette' ? 'cuvettes' : `${layoutFormat}-well plates`} but the instrument reads ${profile.plateFormat === 'cuvette' ? 'cuvettes' : `${profile.plateFormat}-well plates`}.`,
      );
    }
    const open = await this.batches.findOneBy({ profileId: profile.id, runId: input.runId, state: 'open' });
    if (open)
      throw AppError.conflict(
        `Open batch "${open.name}" already collects run "${input.runId}" of this instrument.`,
      );
    const settings = batchSettingsSchema.parse({
      pathLengthCm: profile.pathLengthCm ?? 1,
      wavelengthNm: profile.defaultWavelengthNm,
      ...input.settings,
    });
    const id = await this.dataSource.transaction(async (manager) => {
      const batch = await manager.save(
        manager.create(Batch, {
          name: input.name,
          state: 'open',
          profileId: profile.id,
          layoutId: layout.id,
          layoutVersion: layout.version,
          manifestId: manifest.id,
          manifestVersion: manifest.version,
          runId: input.runId,
          expectedFiles: input.expectedFiles,
          systemName: input.systemName ?? null,
          temperatureC: input.temperatureC ?? null,
          settingsJson: JSON.stringify(settings),
          createdById: actor.id,
          reviewedById: null,
          reviewedAt: null,
          approvedById: null,
          approvedAt: null,
          approvalComment: null,
        }),
      );
      // Files of this run that arrived before the batch existed join it now.
      const waiting = await manager.find(IntakeFile, {
        where: { profileId: profile.id, runId: input.runId, status: 'unassigned' },
      });
      if (waiting.length)
        await manager.update(
          IntakeFile,
          { id: In(waiting.map((f) => f.id)) },
          { status: 'stored', batchId: batch.id },
        );
      await this.audit.record(
        {
          actor,
          action: 'create',
          entity: 'batch',
          entityId: batch.id,
          summary: `Created batch "${batch.name}" for run ${input.runId} (layout v${layout.version}, manifest v${manifest.version}${waiting.length ? `, ${waiting.length} waiting file(s) attached` : ''})`,
          after: { settings },
        },
        manager,
      );
      return batch.id;
    });
    this.events.publish('batch.updated', { id, state: 'open' });
    return this.get(id);
  }

  /**
   * Inside the file's storing transaction: attach it to the open batch of its instrument and run id.
   * Returns the batch id, or null when no batch waits for it (the file is then unassigned).
   */
  async attachStoredFile(
    manager: EntityManager,
    profileId: number,
    runId: string | null,
  ): Promise<number | null> {
    if (!runId) return null;
    const batch = await manager.findOneBy(Batch, { profileId, runId, state: 'open' });
    return batch?.id ?? null;
  }

  /** A lab manager puts an unassigned file into a batch. */
  async assignFile(fileId: number, batchId: number, actor: Actor): Promise<void> {
    const batch = await this.getBatch(batchId);
    this.assertEditable(batch);
    await this.dataSource.transaction(async (manager) => {
      const file = await manager.findOneBy(IntakeFile, { id: fileId });
      if (!file) throw AppError.notFound(`No received file with id ${fileId}.`);
      if (file.status !== 'unassigned')
        throw AppError.conflict(`Only unassigned files can be assigned; this one is ${file.status}.`);
      if (file.profileId !== batch.profileId)
        throw AppError.badRequest('The file comes from another instrument than the batch.');
      await manager.update(IntakeFile, { id: fileId }, { status: 'stored', batchId });
      await this.audit.record(
        {
          actor,
          action: 'assign',
          entity: 'intake_file',
          entityId: fileId,
          summary: `Assigned file "${file.originalName}" to batch "${batch.name}"`,
          after: { batchId },
        },
        manager,
      );
    });
    this.events.publish('file.stored', { id: fileId, batchId });
    this.events.publish('batch.updated', { id: batchId });
  }

  async updateSettings(
    id: number,
    changes: Partial<BatchSettings>,
    reason: string,
    actor: Actor,
  ): Promise<BatchDto> {
    const batch = await this.getBatch(id);
    this.assertEditable(batch);
    const before = batchSettingsSchema.parse(JSON.parse(batch.settingsJson));
    const after = batchSettingsSchema.parse({ ...before, ...changes });
    await this.dataSource.transaction(async (manager) => {
      await manager.update(Batch, { id }, { settingsJson: JSON.stringify(after) });
      const excluded = after.exclusions.filter(
        (e) => !before.exclusions.some((b) => b.position === e.position),
      );
      await this.audit.record(
        {
          actor,
          action: excluded.length ? 'exclude' : 'settings',
          entity: 'batch',
          entityId: id,
          summary: `Changed analysis settings of batch "${batch.name}"${excluded.length ? `; excluded ${excluded.map((e) => e.position).join(', ')}` : ''}`,
          before,
          after,
          reason,
        },
        manager,
      );
    });
    this.events.publish('batch.updated', { id });
    return this.get(id);
  }

  private async transition(
    id: number,
    from: BatchState[],
    to: BatchState,
    actor: Actor,
    action: string,
    text: string | null,
  ): Promise<BatchDto> {
    const batch = await this.getBatch(id);
    if (!from.includes(batch.state)) {
      throw AppError.conflict(
        `Batch "${batch.name}" is ${batch.state}; it must be ${from.join(' or ')} to be ${to === 'open' ? 'reopened' : to}.`,
      );
    }
    const now = new Date().toISOString();
    const changes: Partial<Batch> = { state: to };
    if (to === 'reviewed') Object.assign(changes, { reviewedById: actor.id, reviewedAt: now });
    if (to === 'approved')
      Object.assign(changes, { approvedById: actor.id, approvedAt: now, approvalComment: text });
    if (to === 'open')
      Object.assign(changes, {
        reviewedById: null,
        reviewedAt: null,
        approvedById: null,
        approvedAt: null,
        approvalComment: null,
      });
    await this.dataSource.transaction(async (manager) => {
      await manager.update(Batch, { id }, changes);
      await this.audit.record(
        {
          actor,
          action,
          entity: 'batch',
          entityId: id,
          summary: `Batch "${batch.name}": ${batch.state} → ${to}`,
          before: { state: batch.state },
          after: { state: to },
          reason: text,
        },
        manager,
      );
    });
    this.events.publish('batch.updated', { id, state: to });
    return this.get(id);
  }

  review(id: number, actor: Actor): Promise<BatchDto> {
    return this.transition(id, ['open'], 'reviewed', actor, 'review', null);
  }

  approve(id: number, comment: string, actor: Actor): Promise<BatchDto> {
    return this.transition(id, ['reviewed'], 'approved', actor, 'approve', comment);
  }

  reopen(id: number, reason: string, actor: Actor): Promise<BatchDto> {
    return this.transition(id, ['reviewed', 'approved'], 'open', actor, 'reopen', reason);
  }

  async list(): Promise<BatchDto[]> {
    const batches = await this.batches.find({ order: { id: 'DESC' } });
    return Promise.all(batches.map((b) => this.toDto(b)));
  }

  async get(id: number): Promise<BatchDto> {
    return this.toDto(await this.getBatch(id));
  }

  private async toDto(b: Batch, withSummary = true): Promise<BatchDto> {
    const m = this.dataSource.manager;
    const [profile, layout, manifest, files, reviewer, approver] = await Promise.all([
      m.findOneBy(InstrumentProfile, { id: b.profileId }),
      m.findOneBy(Layout, { id: b.layoutId }),
      m.findOneBy(Manifest, { id: b.manifestId }),
      m.find(IntakeFile, {
        where: { batchId: b.id, status: 'stored' },
        select: { id: true, finishedAt: true },
      }),
      b.reviewedById ? m.findOneBy(User, { id: b.reviewedById }) : null,
      b.approvedById ? m.findOneBy(User, { id: b.approvedById }) : null,
    ]);
    const updatedAt = new Date(b.updatedAt).toISOString();
    const lastFile =
      files
        .map((f) => f.finishedAt ?? '')
        .sort()
        .at(-1) ?? '';
    return {
      id: b.id,
      name: b.name,
      state: b.state,
      profileId: b.profileId,
      profileName: profile?.name ?? null,
      layoutId: b.layoutId,
      layoutName: layout?.name ?? null,
      layoutVersion: b.layoutVersion,
      manifestId: b.manifestId,
      manifestName: manifest?.name ?? null,
      manifestVersion: b.manifestVersion,
      runId: b.runId,
      expectedFiles: b.expectedFiles,
      fileCount: files.length,
      systemName: b.systemName,
      temperatureC: b.temperatureC,
      settings: batchSettingsSchema.parse(JSON.parse(b.settingsJson)),
      createdAt: new Date(b.createdAt).toISOString(),
      updatedAt,
      lastActivityAt: lastFile > updatedAt ? lastFile : updatedAt,
      reviewedBy: reviewer?.displayName ?? null,
      reviewedAt: b.reviewedAt,
      approvedBy: approver?.displayName ?? null,
      approvedAt: b.approvedAt,
      approvalComment: b.approvalComment,
      summary:
        withSummary && files.length
          ? await this.summary(b.id, `${updatedAt}|${files.length}|${lastFile}`)
          : null,
    };
  }

  /** The analysis headline, computed once per change of the batch or its files. */
  private async summary(id: number, key: string): Promise<BatchResultSummary | null> {
    const cached = this.summaries.get(id);
    if (cached?.key === key) return cached.summary;
    try {
      const summary = summarize((await this.analysis(id)).result);
      this.summaries.set(id, { key, summary });
      return summary;
    } catch {
      return null;
    }
  }

  /** The batch's inputs and its analysis, computed with the shared module. */
  async analysis(id: number, overrides: Partial<AnalysisSettings> = {}): Promise<BatchAnalysisDto> {
    const batch = await this.toDto(await this.getBatch(id), false);
    const files = await this.dataSource.manager.find(IntakeFile, {
      where: { batchId: id, status: 'stored' },
      order: { id: 'ASC' },
    });
    const rows = files.length
      ? await this.dataSource.manager.find(ReadingRow, {
          where: { intakeFileId: In(files.map((f) => f.id)) },
          order: { id: 'ASC' },
        })
      : [];
    const readings = rows.map((r) => ({
      intakeFileId: r.intakeFileId,
      position: r.position,
      wavelengthNm: r.wavelengthNm,
      absorbance: r.absorbance,
      ...(r.flag ? { flag: r.flag as Reading['flag'] } : {}),
      ...(r.readTime ? { readTime: r.readTime } : {}),
      ...(r.temperatureC !== null ? { temperatureC: r.temperatureC } : {}),
      ...(r.replicate !== null ? { replicate: r.replicate } : {}),
    }));
    const manifest = await this.manifests.get(batch.manifestId, batch.manifestVersion);
    const layout = await this.layouts.get(batch.layoutId, batch.layoutVersion);
    const settings = toAnalysisSettings(batch.settings, overrides);
    const result = analyzeBatch(readings, manifest.samples, settings);
    if (files.length && Object.keys(overrides).length === 0) batch.summary = summarize(result);
    return {
      batch,
      readings,
      samples: manifest.samples,
      layoutPositions: layout.positions,
      files: files.map((f) => ({
        id: f.id,
        originalName: f.originalName,
        sha256: f.sha256,
        status: f.status,
        readingCount: f.readingCount,
        receivedAt: f.receivedAt,
      })),
      settings,
      result,
    };
  }
}
