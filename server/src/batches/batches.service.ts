import { type DataSource, type EntityManager, In, IsNull, type Repository } from 'typeorm';
import {
  type AnalysisSettings,
  type BatchResult,
  type Reading,
  type SampleDefinition,
  type WaterPeakPathLengths,
  wellPathLengthsFromWaterPeak,
  reportingUnitProblem,
} from '../analysis';
import {
  type AnalysisEngine,
  analyzeSpectraWith,
  analyzeWith,
  currentAnalysisEngine,
} from '../analysis-engine/analysis-engine';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import { exclusively } from '../database/exclusive';
import type { EventBus } from '../events/event-bus';
import { IntakeFile } from '../ingest/intake-file.entity';
import { ReadingRow } from '../ingest/reading.entity';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import type { LayoutsService } from '../layouts/layouts.service';
import type { ManifestsService } from '../manifests/manifests.service';
import { User } from '../users/user.entity';
import {
  addWaterNotes,
  hasSpectra,
  spectralReadings,
  spectralSettingsOf,
  withWellPathLengths,
} from './analysis-extras';
import { Batch, type BatchState } from './batch.entity';
import { BATCH_RESULT_SCHEMA_VERSION, BatchResultRecord } from './batch-result.entity';
import { BatchListQueryBuilder, type SystemFitRow, type SystemPointRow } from './batch-list';
import type { SummaryState } from './batch-summary.entity';
import { BatchSummaryStore, type StoredSpectral, inputsHash, type SummaryWrite } from './batch-summary-store';
import type {
  ApprovalRecordDto,
  ApprovalRecordFullDto,
  BatchAnalysisDto,
  BatchDto,
  BatchListItemDto,
  BatchListParams,
  BatchResultSummary,
  EngineCheckDto,
  EpsilonCandidateDto,
  RecordedFile,
} from '../contracts/batches';
import {
  type BatchSettings,
  type CreateBatchInput,
  type EpsilonSource,
  type SettingsChange,
  batchSettingsSchema,
} from '../contracts/batches';

export type {
  ApprovalRecordDto,
  ApprovalRecordFullDto,
  BatchAnalysisDto,
  BatchDto,
  BatchResultSummary,
  EngineCheckDto,
  EpsilonCandidateDto,
  RecordedFile,
};

/** The headline of an analysis result. */
export function summarize(result: BatchResult): BatchResultSummary {
  const best = result.stoichiometry?.candidates.find((c) => c.model === result.stoichiometry?.best) ?? null;
  const h = result.headline;
  return {
    qcFlagCount: result.qc.filter((f) => f.severity !== 'info').length,
    qcErrorCount: result.qc.filter((f) => f.severity === 'error').length,
    best: result.stoichiometry?.best ?? null,
    // A result without a headline (written before K statements existed) speaks through its best fit.
    k: h ? h.k : (best?.fit?.k ?? null),
    kSe: best?.fit?.kSe ?? null,
    kCi95: h ? h.kCi95 : (best?.fit?.kCi95 ?? null),
    kStatus: h?.status ?? best?.fit?.status ?? null,
    kLowerBound95: h ? h.kLowerBound95 : (best?.fit?.kLowerBound95 ?? null),
    kUpperBound95: h ? h.kUpperBound95 : (best?.fit?.kUpperBound95 ?? null),
    kUnit: h?.kUnit ?? best?.kUnit ?? null,
    kText: h?.text ?? null,
  };
}

/** What an approved result says at a glance: best model, K, its interval, and what is known of K. */
export function headlineOf(result: BatchResult): Record<string, unknown> {
  const s = summarize(result);
  return {
    best: s.best,
    k: s.k,
    kCi95: s.kCi95,
    kStatus: s.kStatus,
    kLowerBound95: s.kLowerBound95,
    kUpperBound95: s.kUpperBound95,
  };
}

/**
 * Whether two results say something different at a glance. Best model, K and its interval always count;
 * a field only one engine reports (a K status an older engine did not have) does not by itself.
 */
export function headlinesDiffer(a: BatchResult, b: BatchResult): boolean {
  const ha = headlineOf(a);
  const hb = headlineOf(b);
  const keys = Object.keys(ha).filter(
    (k) => ['best', 'k', 'kCi95'].includes(k) || (ha[k] !== null && hb[k] !== null),
  );
  return keys.some((k) => !sameValue(ha[k], hb[k]));
}

/** Equal to 6 significant figures (numbers), element by element (arrays), or exactly (anything else). */
export function sameValue(a: unknown, b: unknown): boolean {
  if (typeof a === 'number' && typeof b === 'number') {
    if (!Number.isFinite(a) || !Number.isFinite(b)) return Object.is(a, b);
    return Math.abs(a - b) <= 1e-6 * Math.max(Math.abs(a), Math.abs(b));
  }
  if (Array.isArray(a) && Array.isArray(b))
    return a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    return [...keys].every((k) =>
      sameValue((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]),
    );
  }
  return a === b || (a == null && b == null);
}

/** Settings a person gave, with defaults, checked as a whole: a mass unit needs the analyte's molar mass. */
function checkedSettings(input: Record<string, unknown>): BatchSettings {
  const settings = batchSettingsSchema.parse(input);
  const problem = reportingUnitProblem(settings.concentrationUnit, settings.molarMassGPerMol);
  if (problem) throw AppError.badRequest(`Concentration unit: ${problem}.`);
  return settings;
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
    concentrationUnit: settings.concentrationUnit,
    molarMassGPerMol: settings.molarMassGPerMol,
    recoveryLimitsPct: settings.recoveryLimitsPct,
    ...overrides,
  };
}

export interface BatchesOptions {
  /** The analysis and its version; the module of this build unless a test simulates another. */
  engine?: AnalysisEngine;
  /** Lab policy: the approver neither created the batch nor marked it reviewed. */
  fourEyesApproval?: boolean;
  /** Where background work (stored summaries) reports what went wrong. */
  log?: (message: string, err?: unknown) => void;
}

/** The inputs of a batch's analysis, read in one go. */
interface BatchInputs {
  readings: (Reading & { intakeFileId: number })[];
  samples: SampleDefinition[];
  layoutPositions: { position: string; role: string; replicateGroup?: string }[];
  files: BatchAnalysisDto['files'];
  wellPathLengths: WaterPeakPathLengths | null;
}

/**
 * Batches: creation, files attached by run id, settings, review and approval — all audited. Approval
 * freezes the result in an approval record; an approved batch is shown from that record only.
 */
export class BatchesService {
  private readonly batches: Repository<Batch>;
  private readonly records: Repository<BatchResultRecord>;
  private readonly engine: AnalysisEngine;
  private readonly fourEyesApproval: boolean;
  private readonly log: (message: string, err?: unknown) => void;
  private readonly listQuery: BatchListQueryBuilder;
  private readonly store: BatchSummaryStore;
  /** Summary refreshes running, by batch; a change during one asks for another run after it. */
  private readonly refreshing = new Map<number, Promise<void>>();
  private readonly refreshAgain = new Set<number>();
  /** Analyses running, by batch, inputs and engine: a page and a summary refresh share one. */
  private readonly computing = new Map<string, Promise<BatchResult>>();
  private backfill: Promise<void> | null = null;
  private closing = false;

  constructor(
    private readonly dataSource: DataSource,
    private readonly layouts: LayoutsService,
    private readonly manifests: ManifestsService,
    private readonly audit: AuditService,
    private readonly events: EventBus,
    options: BatchesOptions = {},
  ) {
    this.batches = dataSource.getRepository(Batch);
    this.records = dataSource.getRepository(BatchResultRecord);
    this.engine = options.engine ?? currentAnalysisEngine();
    this.fourEyesApproval = options.fourEyesApproval ?? false;
    this.log = options.log ?? console.error;
    this.listQuery = new BatchListQueryBuilder(dataSource);
    this.store = new BatchSummaryStore(dataSource);
  }

  /** The version of the analysis this server runs. */
  get engineVersion(): string {
    return this.engine.version.label;
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
    const settings = checkedSettings({
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
      await this.store.touch(manager, batch.id, {
        inputsChanged: true,
        sampleIds: manifest.samples.map((sample) => sample.sampleId),
      });
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
    this.refreshSummary(id);
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

  /** Inside the file's storing transaction, once the file is stored in the batch: its summary becomes pending. */
  async fileStored(manager: EntityManager, batchId: number): Promise<void> {
    await this.store.touch(manager, batchId, { inputsChanged: true });
  }

  /** After the file's transaction: work out the batch's new headline in the background. */
  fileCommitted(batchId: number): void {
    this.refreshSummary(batchId);
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
      await this.store.touch(manager, batchId, { inputsChanged: true });
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
    this.refreshSummary(batchId);
  }

  async updateSettings(id: number, change: SettingsChange, reason: string, actor: Actor): Promise<BatchDto> {
    const batch = await this.getBatch(id);
    this.assertEditable(batch);
    const before = batchSettingsSchema.parse(JSON.parse(batch.settingsJson));
    const { epsilonFromBatchId, ...changes } = change;
    let epsilonSource: EpsilonSource | null = before.epsilonSource;
    if (epsilonFromBatchId !== undefined) {
      const candidate = await this.epsilonCandidate(batch, epsilonFromBatchId);
      changes.epsilonLPerMolCm = candidate.epsilonLPerMolCm;
      epsilonSource = {
        batchId: candidate.batchId,
        batchName: candidate.batchName,
        recordId: candidate.recordId,
        wavelengthNm: candidate.wavelengthNm,
        epsilonLPerMolCm: candidate.epsilonLPerMolCm,
        takenAt: new Date().toISOString(),
      };
    } else if (changes.epsilonLPerMolCm !== undefined) {
      // A typed value, or back to this batch's own standards.
      epsilonSource = null;
    }
    const after = checkedSettings({ ...before, ...changes, epsilonSource });
    await this.dataSource.transaction(async (manager) => {
      await manager.update(Batch, { id }, { settingsJson: JSON.stringify(after) });
      await this.store.touch(manager, id, { inputsChanged: true });
      const excluded = after.exclusions.filter(
        (e) => !before.exclusions.some((b) => b.position === e.position),
      );
      await this.audit.record(
        {
          actor,
          action: excluded.length ? 'exclude' : 'settings',
          entity: 'batch',
          entityId: id,
          summary: `Changed analysis settings of batch "${batch.name}"${excluded.length ? `; excluded ${excluded.map((e) => e.position).join(', ')}` : ''}${epsilonFromBatchId !== undefined ? `; ε from batch "${epsilonSource?.batchName}"${epsilonSource?.recordId ? `, record ${epsilonSource.recordId}` : ''}` : ''}`,
          before,
          after,
          reason,
        },
        manager,
      );
    });
    this.events.publish('batch.updated', { id });
    this.refreshSummary(id);
    return this.get(id);
  }

  /** The four-eyes rule, when the lab keeps it: the approver neither created nor reviewed the batch. */
  private assertFourEyes(batch: Batch, actor: Actor): void {
    if (!this.fourEyesApproval) return;
    const did =
      batch.createdById === actor.id
        ? 'created it'
        : batch.reviewedById === actor.id
          ? 'marked it reviewed'
          : null;
    if (did)
      throw new AppError(
        'four_eyes',
        403,
        `Four-eyes approval: batch "${batch.name}" must be approved by someone other than whoever created it or marked it reviewed, and you ${did}. Ask another lab manager to approve it.`,
      );
  }

  private async transition(
    id: number,
    from: BatchState[],
    to: BatchState,
    actor: Actor,
    action: string,
    text: string | null,
  ): Promise<BatchDto> {
    await this.dataSource.transaction(async (manager) => {
      // Read again inside the transaction: the state checked is the state changed.
      const batch = await manager.findOneBy(Batch, { id });
      if (!batch) throw AppError.notFound(`No batch with id ${id}.`);
      if (!from.includes(batch.state)) {
        throw AppError.conflict(
          `Batch "${batch.name}" is ${batch.state}; it must be ${from.join(' or ')} to be ${to === 'open' ? 'reopened' : to}.`,
        );
      }
      if (to === 'approved') this.assertFourEyes(batch, actor);
      const now = new Date().toISOString();
      const changes: Partial<Batch> = { state: to };
      if (to === 'reviewed') Object.assign(changes, { reviewedById: actor.id, reviewedAt: now });
      if (to === 'approved') {
        Object.assign(changes, { approvedById: actor.id, approvedAt: now, approvalComment: text });
        await this.storeRecord(manager, batch, actor, now, text ?? '');
      }
      if (to === 'open') {
        Object.assign(changes, {
          reviewedById: null,
          reviewedAt: null,
          approvedById: null,
          approvedAt: null,
          approvalComment: null,
        });
        // The approval record stays; it is only marked as no longer the batch's current one.
        await manager.update(
          BatchResultRecord,
          { batchId: id, supersededAt: IsNull() },
          { supersededAt: now, supersededById: actor.id, supersededReason: text },
        );
      }
      await manager.update(Batch, { id }, changes);
      await this.store.touch(manager, id, { inputsChanged: false, now });
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
    // Reopened: the headline is the analysis again (the same one while inputs and engine are the same).
    if (to === 'open') this.refreshSummary(id);
    return this.get(id);
  }

  /** Analyse the batch as it stands and keep everything needed to show and check it later. */
  private async storeRecord(
    manager: EntityManager,
    batch: Batch,
    actor: Actor,
    approvedAt: string,
    comment: string,
  ): Promise<void> {
    const settings = batchSettingsSchema.parse(JSON.parse(batch.settingsJson));
    const inputs = await this.loadInputs(batch, manager);
    const analysisSettings = withWellPathLengths(toAnalysisSettings(settings), inputs.wellPathLengths);
    let result: BatchResult;
    try {
      result = addWaterNotes(
        this.engine.analyze(inputs.readings, inputs.samples, analysisSettings),
        inputs.wellPathLengths,
      );
    } catch (err) {
      throw AppError.conflict(
        `Batch "${batch.name}" cannot be approved: its analysis fails (${err instanceof Error ? err.message : String(err)}). Fix the settings or the data first.`,
      );
    }
    const files: RecordedFile[] = inputs.files.map((f) => ({
      id: f.id,
      originalName: f.originalName,
      sha256: f.sha256,
      readingCount: f.readingCount,
      receivedAt: f.receivedAt,
    }));
    await manager.insert(BatchResultRecord, {
      batchId: batch.id,
      schemaVersion: BATCH_RESULT_SCHEMA_VERSION,
      engineVersion: this.engine.version.label,
      enginePackageVersion: this.engine.version.packageVersion,
      engineSourceSha256: this.engine.version.sourceSha256,
      settingsJson: JSON.stringify(settings),
      analysisSettingsJson: JSON.stringify(analysisSettings),
      resultJson: JSON.stringify(result),
      filesJson: JSON.stringify(files),
      approvedById: actor.id,
      approvedAt,
      approvalComment: comment,
      supersededAt: null,
      supersededById: null,
      supersededReason: null,
    });
    await this.store.writeNow(manager, batch.id, {
      status: 'current',
      source: 'record',
      inputsHash: inputsHash(batch, inputs.files),
      engineVersion: this.engine.version.label,
      error: null,
      summary: summarize(result),
      result,
    });
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

  /** A page of batches with their stored headlines: two queries, whatever the page size; no analysis. */
  list(query: Partial<BatchListParams> = {}): Promise<{ items: BatchListItemDto[]; total: number }> {
    return this.listQuery.page(
      {
        state: query.state,
        profileId: query.profileId,
        unapproved: query.unapproved === 'true',
        q: query.q,
      },
      query,
    );
  }

  /** Every batch of a chemical system (or of every one) with a temperature, newest first: fit columns only. */
  systemFitRows(systemName?: string): Promise<SystemFitRow[]> {
    return this.listQuery.systemFitRows(systemName);
  }

  /** A page of one system's batches with their K headline, by temperature, then id. */
  systemPoints(systemName: string, window: { offset: number; limit: number }): Promise<SystemPointRow[]> {
    return this.listQuery.systemPoints(systemName, window);
  }

  async get(id: number): Promise<BatchDto> {
    return this.toDto(await this.getBatch(id));
  }

  private async userNames(ids: (number | null)[]): Promise<Map<number, string>> {
    const wanted = [...new Set(ids.filter((x): x is number => x !== null))];
    if (!wanted.length) return new Map();
    const users = await this.dataSource.manager.find(User, { where: { id: In(wanted) } });
    return new Map(users.map((u) => [u.id, u.displayName]));
  }

  private async toDto(b: Batch): Promise<BatchDto> {
    const [row] = await this.listQuery.all({ id: b.id });
    if (!row) throw AppError.notFound(`No batch with id ${b.id}.`);
    const { summaryState: _state, summaryError: _error, ...dto } = row;
    return dto;
  }

  /** The stored headlines of some batches (the Overview): one query, never an analysis. */
  storedSummaries(
    ids: readonly number[],
  ): Promise<Map<number, { status: SummaryState; summary: BatchResultSummary | null }>> {
    return this.store.ofBatches(ids);
  }

  // -------------------------------------------------------------------------------------------------
  // Stored summaries

  /**
   * Work out a batch's stored headline again, in the background: one run per batch at a time, and one
   * more when a change came in during it. Nothing is analysed when the inputs and the engine are those
   * the stored headline was computed from.
   */
  refreshSummary(id: number): void {
    if (this.closing) return;
    if (this.refreshing.has(id)) {
      this.refreshAgain.add(id);
      return;
    }
    const run = (async () => {
      do {
        this.refreshAgain.delete(id);
        try {
          await this.updateSummary(id);
        } catch (err) {
          if (!this.closing) this.log(`Could not store the summary of batch ${id}`, err);
        }
      } while (this.refreshAgain.has(id) && !this.closing);
    })();
    this.refreshing.set(id, run);
    void run.finally(() => this.refreshing.delete(id));
  }

  /** Wait until no summary is being worked out (tests, shutdown). */
  async summariesIdle(): Promise<void> {
    while (this.refreshing.size || this.backfill) {
      await Promise.allSettled([...this.refreshing.values(), ...(this.backfill ? [this.backfill] : [])]);
    }
  }

  /**
   * At start, in the background: a summary row for every batch made before summaries were stored, then
   * the headlines still pending (a stop during an analysis) or computed by another engine, one at a time.
   * Once written, a restart finds them and analyses nothing.
   */
  startSummaryBackfill(): Promise<void> {
    // One process at a time on a shared database: a second one then finds the summaries written.
    this.backfill ??= exclusively(this.dataSource, 'summary-backfill', async () => {
      try {
        for (const id of await this.store.missing()) {
          if (this.closing) return;
          const batch = await this.batches.findOneBy({ id });
          if (!batch) continue;
          const manifest = await this.manifests.get(batch.manifestId, batch.manifestVersion);
          await this.dataSource.transaction((manager) =>
            this.store.touch(manager, id, {
              inputsChanged: true,
              sampleIds: manifest.samples.map((sample) => sample.sampleId),
              now: new Date(batch.updatedAt).toISOString(),
            }),
          );
        }
        for (const id of await this.store.toRefresh(this.engine.version.label)) {
          if (this.closing) return;
          this.refreshSummary(id);
          await this.refreshing.get(id);
        }
      } catch (err) {
        if (!this.closing) this.log('Could not fill in the stored batch summaries', err);
      }
    })
      .catch((err: unknown) => {
        if (!this.closing) this.log('Could not fill in the stored batch summaries', err);
      })
      .finally(() => {
        this.backfill = null;
      });
    return this.backfill;
  }

  /** Stop background summary work and wait for what runs (shutdown). */
  async close(): Promise<void> {
    this.closing = true;
    await this.summariesIdle();
  }

  private async updateSummary(id: number): Promise<void> {
    const batch = await this.batches.findOneBy({ id });
    const row = batch ? await this.store.find(id) : null;
    if (!batch || !row) return;
    const revision = row.revision;
    let write: SummaryWrite;
    const record = batch.state === 'approved' ? await this.currentRecordRow(id) : null;
    if (record) {
      if (row.source === 'record' && row.status === 'current') return;
      const result = JSON.parse(record.resultJson) as BatchResult;
      write = {
        status: 'current',
        source: 'record',
        inputsHash: null,
        engineVersion: record.engineVersion,
        error: null,
        summary: summarize(result),
        result,
      };
    } else {
      const files = await this.dataSource.manager.find(IntakeFile, {
        where: { batchId: id, status: 'stored' },
        select: { id: true, sha256: true },
      });
      const hash = inputsHash(batch, files);
      const engineVersion = this.engine.version.label;
      const same = row.inputsHash === hash && row.engineVersion === engineVersion;
      if (!files.length) {
        write = {
          status: 'none',
          source: null,
          inputsHash: hash,
          engineVersion,
          error: null,
          summary: null,
          result: null,
        };
      } else if (same && (row.summaryJson || row.error)) {
        // The stored headline (or failure) is of these very inputs: nothing to analyse.
        if (row.status !== 'pending' && row.source === 'analysis') return;
        const stored = await this.store.analysisOf(id, { inputsHash: hash, engineVersion });
        write = {
          status: row.summaryJson ? 'current' : 'failed',
          source: 'analysis',
          inputsHash: hash,
          engineVersion,
          error: row.error,
          summary: row.summaryJson ? (JSON.parse(row.summaryJson) as BatchResultSummary) : null,
          result: stored?.resultJson ? (JSON.parse(stored.resultJson) as BatchResult) : null,
          spectral: stored?.spectralJson ? (JSON.parse(stored.spectralJson) as StoredSpectral) : null,
        };
      } else {
        const inputs = await this.loadInputs(batch);
        const settings = withWellPathLengths(
          toAnalysisSettings(batchSettingsSchema.parse(JSON.parse(batch.settingsJson))),
          inputs.wellPathLengths,
        );
        try {
          const result = await this.computeResult(id, hash, inputs, settings);
          write = {
            status: 'current',
            source: 'analysis',
            inputsHash: hash,
            engineVersion,
            error: null,
            summary: summarize(result),
            result,
            spectral: await this.spectralToStore(inputs, settings),
          };
        } catch (err) {
          if (err instanceof AppError && err.status === 503) throw err; // busy: not the batch's fault
          const error = err instanceof Error ? err.message : String(err);
          write = {
            status: 'failed',
            source: 'analysis',
            inputsHash: hash,
            engineVersion,
            error,
            summary: null,
            result: null,
          };
        }
        write.sampleIds = inputs.samples.map((sample) => sample.sampleId);
      }
    }
    const changed =
      row.status !== write.status ||
      row.summaryJson !== (write.summary ? JSON.stringify(write.summary) : null) ||
      row.error !== write.error;
    if (!(await this.store.writeIfRevision(id, revision, write))) {
      this.refreshAgain.add(id); // a newer change came in: its inputs are analysed next
      return;
    }
    if (changed) this.events.publish('batch.updated', { id });
  }

  /** The analysis of a batch's current inputs, off the main thread; one run per inputs and engine at a time. */
  private computeResult(
    id: number,
    hash: string,
    inputs: BatchInputs,
    settings: AnalysisSettings,
  ): Promise<BatchResult> {
    const key = `${id}|${hash}|${this.engine.version.label}`;
    let running = this.computing.get(key);
    if (!running) {
      running = analyzeWith(this.engine, inputs.readings, inputs.samples, settings).then((result) =>
        addWaterNotes(result, inputs.wellPathLengths),
      );
      this.computing.set(key, running);
      void running.then(
        () => this.computing.delete(key),
        () => this.computing.delete(key),
      );
    }
    return running;
  }

  /** The readings, samples, layout and files of a batch, read through `manager` (a transaction's, or the default). */
  private async loadInputs(
    batch: Pick<Batch, 'id' | 'manifestId' | 'manifestVersion' | 'layoutId' | 'layoutVersion'>,
    manager: EntityManager = this.dataSource.manager,
  ): Promise<BatchInputs> {
    const files = await manager.find(IntakeFile, {
      where: { batchId: batch.id, status: 'stored' },
      order: { id: 'ASC' },
    });
    const rows = files.length
      ? await manager.find(ReadingRow, {
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
    return {
      readings,
      samples: manifest.samples,
      layoutPositions: layout.positions,
      // Plates only: a cuvette's path is its own, known length.
      wellPathLengths:
        layout.format === 'cuvette' ? null : wellPathLengthsFromWaterPeak(readings, manifest.samples),
      files: files.map((f) => ({
        id: f.id,
        originalName: f.originalName,
        sha256: f.sha256,
        status: f.status,
        readingCount: f.readingCount,
        receivedAt: f.receivedAt,
      })),
    };
  }

  /**
   * The batch's inputs and its analysis. An approved batch answers with its approval record's result and
   * settings, never a recomputation; `engineCheck` adds what today's engine would say, beside it.
   */
  async analysis(
    id: number,
    overrides: Partial<AnalysisSettings> = {},
    options: { engineCheck?: boolean } = {},
  ): Promise<BatchAnalysisDto> {
    const entity = await this.getBatch(id);
    const batch = await this.toDto(entity);
    const inputs = await this.loadInputs(entity);
    const hasOverrides = Object.keys(overrides).length > 0;
    const row = entity.state === 'approved' && !hasOverrides ? await this.currentRecordRow(id) : null;
    if (row) {
      const full = await this.toRecordFull(row);
      batch.summary = full.summary;
      return {
        batch,
        ...inputs,
        settings: full.analysisSettings,
        result: full.result,
        record: this.withoutResult(full),
        ...(await this.approvedSpectral(entity, inputs, full.analysisSettings)),
        ...(options.engineCheck ? { engineCheck: await this.engineCheck(full, inputs) } : {}),
        approvals: await this.recordsOf(id),
      };
    }
    const settings = withWellPathLengths(
      toAnalysisSettings(batch.settings, overrides),
      inputs.wellPathLengths,
    );
    const { result, spectral } = hasOverrides
      ? {
          result: addWaterNotes(
            await analyzeWith(this.engine, inputs.readings, inputs.samples, settings),
            inputs.wellPathLengths,
          ),
          spectral: await this.spectral(inputs, settings),
        }
      : await this.currentResult(entity, inputs, settings);
    if (inputs.files.length && !hasOverrides) batch.summary = summarize(result);
    return {
      batch,
      ...inputs,
      settings,
      result,
      ...spectral,
      record: null,
      approvals: await this.recordsOf(id),
    };
  }

  /**
   * The analysis of the batch as it stands, with its whole-spectrum part: the stored ones when they are of
   * these inputs and this engine, else computed off the main thread and stored (when no newer change came
   * in meanwhile).
   */
  private async currentResult(
    batch: Batch,
    inputs: BatchInputs,
    settings: AnalysisSettings,
  ): Promise<{ result: BatchResult; spectral: StoredSpectral }> {
    const row = await this.store.find(batch.id);
    const hash = inputsHash(batch, inputs.files);
    const engineVersion = this.engine.version.label;
    const stored = row ? await this.store.analysisOf(batch.id, { inputsHash: hash, engineVersion }) : null;
    if (stored?.resultJson) {
      const result = JSON.parse(stored.resultJson) as BatchResult;
      const version = { inputsHash: hash, engineVersion };
      return { result, spectral: await this.storedSpectral(batch.id, version, stored, inputs, settings) };
    }
    const result = await this.computeResult(batch.id, hash, inputs, settings);
    const spectral = await this.spectral(inputs, settings);
    if (row && inputs.files.length) {
      const write: SummaryWrite = {
        status: 'current',
        source: 'analysis',
        inputsHash: hash,
        engineVersion,
        error: null,
        summary: summarize(result),
        result,
        spectral,
      };
      const changed = row.summaryJson !== JSON.stringify(write.summary) || row.status !== 'current';
      if ((await this.store.writeIfRevision(batch.id, row.revision, write)) && changed)
        this.events.publish('batch.updated', { id: batch.id });
    }
    return { result, spectral };
  }

  /**
   * The whole-spectrum part beside an approved batch's record (the record holds the result at the analysed
   * wavelength): the stored one of these inputs and engine, else worked out now and stored with them.
   */
  private async approvedSpectral(
    batch: Batch,
    inputs: BatchInputs,
    settings: AnalysisSettings,
  ): Promise<StoredSpectral> {
    const version = { inputsHash: inputsHash(batch, inputs.files), engineVersion: this.engine.version.label };
    const stored = await this.store.analysisOf(batch.id, version);
    return this.storedSpectral(batch.id, version, stored, inputs, settings);
  }

  /**
   * The whole-spectrum part stored with an analysis of these inputs and engine; when it is missing, worked
   * out now and stored beside that analysis (when there is one to store it with).
   */
  private async storedSpectral(
    batchId: number,
    version: { inputsHash: string; engineVersion: string },
    stored: { spectralJson: string | null } | null,
    inputs: BatchInputs,
    settings: AnalysisSettings,
  ): Promise<StoredSpectral> {
    if (stored?.spectralJson) return JSON.parse(stored.spectralJson) as StoredSpectral;
    const spectral = await this.spectral(inputs, settings);
    if (stored) await this.store.writeSpectral(batchId, version, spectral);
    return spectral;
  }

  /**
   * The whole-spectrum part to store with a new result; null (worked out when the page asks) when the
   * analysis threads cannot take it now — the stored headline does not wait for it.
   */
  private spectralToStore(inputs: BatchInputs, settings: AnalysisSettings): Promise<StoredSpectral | null> {
    return this.spectral(inputs, settings).catch((err: unknown) => {
      if (err instanceof AppError) return null;
      throw err;
    });
  }

  /** The whole-spectrum analysis when the batch has spectra (on an analysis thread); else nothing. */
  private async spectral(inputs: BatchInputs, settings: AnalysisSettings): Promise<StoredSpectral> {
    if (!hasSpectra(inputs.readings, inputs.wellPathLengths)) return { spectral: null, spectralError: null };
    try {
      const spectral = await analyzeSpectraWith(
        this.engine,
        spectralReadings(inputs.readings, inputs.wellPathLengths),
        inputs.samples,
        spectralSettingsOf(settings),
      );
      return { spectral, spectralError: null };
    } catch (err) {
      if (err instanceof AppError) throw err;
      return { spectral: null, spectralError: err instanceof Error ? err.message : String(err) };
    }
  }

  /** Today's engine on the record's inputs and settings, compared with the record's headline. */
  private async engineCheck(record: ApprovalRecordFullDto, inputs: BatchInputs): Promise<EngineCheckDto> {
    const engineVersion = this.engine.version.label;
    const sameEngine =
      record.engine.sourceSha256 === this.engine.version.sourceSha256 &&
      record.engine.packageVersion === this.engine.version.packageVersion;
    const hashes = (files: { sha256: string }[]) =>
      files
        .map((f) => f.sha256)
        .sort()
        .join(',');
    const inputsMatch = hashes(record.files) === hashes(inputs.files);
    try {
      const now = addWaterNotes(
        await analyzeWith(
          this.engine,
          inputs.readings,
          inputs.samples,
          withWellPathLengths(toAnalysisSettings(record.settings), inputs.wellPathLengths),
        ),
        inputs.wellPathLengths,
      );
      return {
        engineVersion,
        sameEngine,
        differs: headlinesDiffer(now, record.result),
        inputsMatch,
        current: summarize(now),
        error: null,
      };
    } catch (err) {
      return {
        engineVersion,
        sameEngine,
        differs: true,
        inputsMatch,
        current: null,
        error: err instanceof Error ? err.message : String(err),
      };
    }
  }

  private currentRecordRow(batchId: number): Promise<BatchResultRecord | null> {
    return this.records.findOne({
      where: { batchId, supersededAt: IsNull() },
      order: { id: 'DESC' },
    });
  }

  private async toRecordFull(row: BatchResultRecord): Promise<ApprovalRecordFullDto> {
    const names = await this.userNames([row.approvedById, row.supersededById]);
    const result = JSON.parse(row.resultJson) as BatchResult;
    return {
      id: row.id,
      batchId: row.batchId,
      schemaVersion: row.schemaVersion,
      engine: {
        version: row.engineVersion,
        packageVersion: row.enginePackageVersion,
        sourceSha256: row.engineSourceSha256,
      },
      approvedBy: row.approvedById ? (names.get(row.approvedById) ?? null) : null,
      approvedAt: row.approvedAt,
      approvalComment: row.approvalComment,
      settings: batchSettingsSchema.parse(JSON.parse(row.settingsJson)),
      files: JSON.parse(row.filesJson) as RecordedFile[],
      summary: summarize(result),
      supersededAt: row.supersededAt,
      supersededBy: row.supersededById ? (names.get(row.supersededById) ?? null) : null,
      supersededReason: row.supersededReason,
      analysisSettings: JSON.parse(row.analysisSettingsJson) as AnalysisSettings,
      result,
    };
  }

  private withoutResult(full: ApprovalRecordFullDto): ApprovalRecordDto {
    const { analysisSettings: _settings, result: _result, ...record } = full;
    return record;
  }

  /** Every approval record of a batch, newest first: the current one and those a reopening superseded. */
  async results(batchId: number): Promise<ApprovalRecordDto[]> {
    await this.getBatch(batchId);
    return this.recordsOf(batchId);
  }

  private async recordsOf(batchId: number): Promise<ApprovalRecordDto[]> {
    const rows = await this.records.find({ where: { batchId }, order: { id: 'DESC' } });
    return Promise.all(rows.map(async (r) => this.withoutResult(await this.toRecordFull(r))));
  }

  /** One approval record with its full result. */
  async result(batchId: number, recordId: number): Promise<ApprovalRecordFullDto> {
    const row = await this.records.findOneBy({ id: recordId, batchId });
    if (!row) throw AppError.notFound(`Batch ${batchId} has no approval record ${recordId}.`);
    return this.toRecordFull(row);
  }

  /**
   * Batches whose calibration can lend ε of the complex to this one: the same chemical system, analysed
   * at the same wavelength within ±1 nm, with a calibration. Approved batches lend the value of their approval record.
   */
  async epsilonSources(id: number): Promise<EpsilonCandidateDto[]> {
    const batch = await this.getBatch(id);
    if (!batch.systemName) return [];
    const wavelengthNm = (await this.analysis(id)).result.wavelengthNm;
    if (wavelengthNm === null) return [];
    const others = await this.batches.find({
      where: { systemName: batch.systemName },
      order: { id: 'DESC' },
    });
    const out: EpsilonCandidateDto[] = [];
    for (const other of others) {
      if (other.id === id) continue;
      const found = await this.calibrationOf(other);
      if (found && Math.abs(found.wavelengthNm - wavelengthNm) <= 1) out.push(found);
    }
    return out;
  }

  /** The calibration another batch offers: from its approval record when approved, else its analysis now. */
  private async calibrationOf(other: Batch): Promise<EpsilonCandidateDto | null> {
    let result: BatchResult;
    let recordId: number | null = null;
    const row = other.state === 'approved' ? await this.currentRecordRow(other.id) : null;
    if (row) {
      result = JSON.parse(row.resultJson) as BatchResult;
      recordId = row.id;
    } else {
      try {
        result = (await this.analysis(other.id)).result;
      } catch {
        return null;
      }
    }
    const cal = result.calibration;
    if (!cal || result.wavelengthNm === null || !(cal.epsilonLPerMolCm > 0)) return null;
    return {
      batchId: other.id,
      batchName: other.name,
      state: other.state,
      temperatureC: other.temperatureC,
      recordId,
      wavelengthNm: result.wavelengthNm,
      epsilonLPerMolCm: cal.epsilonLPerMolCm,
      epsilonSe: cal.epsilonSe,
    };
  }

  /** The one candidate a settings change names, or a 400 that says why it cannot lend ε. */
  private async epsilonCandidate(batch: Batch, sourceId: number): Promise<EpsilonCandidateDto> {
    if (sourceId === batch.id)
      throw AppError.badRequest(
        "ε from another batch: choose another batch, not this one (use this batch's standards instead).",
      );
    const other = await this.batches.findOneBy({ id: sourceId });
    if (!other) throw AppError.badRequest(`ε from another batch: there is no batch with id ${sourceId}.`);
    const found = (await this.epsilonSources(batch.id)).find((c) => c.batchId === sourceId);
    if (found) return found;
    if (!batch.systemName || other.systemName !== batch.systemName)
      throw AppError.badRequest(
        `ε from another batch: "${other.name}" is not a calibration of the same chemical system (${other.systemName ?? 'none given'} vs ${batch.systemName ?? 'none given'}).`,
      );
    throw AppError.badRequest(
      `ε from another batch: "${other.name}" has no calibration at this batch's wavelength (±1 nm).`,
    );
  }
}
