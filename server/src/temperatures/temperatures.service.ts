import { type VantHoffResult, vantHoff } from '../analysis';
import { AppError } from '../common/app-error';
import type {
  SystemTemperatures,
  TemperatureGroup,
  TemperaturePoint,
  TemperaturePointsPage,
} from '../contracts/temperatures';
import type { BatchesService } from '../batches/batches.service';
import type { SystemFitRow } from '../batches/batch-list';
import type { EventBus } from '../events/event-bus';
import type { TemperatureSystemRow } from './temperature-system.entity';
import {
  type SystemAnswers,
  type TemperatureSystemStore,
  answersAreCurrent,
  answersFormat,
  currentAnswers,
} from './temperature-systems';

export type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';

/** Which batches count: approved ones only, unless asked. */
export interface TemperaturesOptions {
  includeUnapproved?: boolean;
}

/** How long after a batch change this process waits before working out the answers it made stale. */
const REFRESH_AFTER_MS = 500;

/**
 * K of each chemical system at several temperatures and the van 't Hoff fit across them. Each system's
 * answers (fit, counts, per-temperature groups) are stored with the generation of the system they are
 * of (`temperature_systems`); a read serves them while no batch of the system has changed, and otherwise
 * works them out from the batches' stored headlines (five narrow columns per batch, no analysis) and
 * stores them. After a batch change this process also works them out in the background, so the page's
 * next read finds them. The batches themselves are listed a page at a time.
 */
export class TemperaturesService {
  private timer: NodeJS.Timeout | null = null;
  private refreshing: Promise<void> | null = null;
  private closing = false;
  private readonly unsubscribe: () => void;

  constructor(
    private readonly batches: BatchesService,
    private readonly store: TemperatureSystemStore,
    events: EventBus,
    private readonly log: (message: string, err?: unknown) => void = console.error,
  ) {
    this.unsubscribe = events.subscribeLocal((event) => {
      if (event.type === 'batch.updated') this.refreshSoon();
    });
  }

  async systems(options: TemperaturesOptions = {}): Promise<SystemTemperatures[]> {
    const answers = [];
    for (const a of await this.answersOfAll(await this.store.all())) {
      if (a.all.counts.batches) answers.push(options.includeUnapproved ? a.all : a.approved);
    }
    return answers.sort((a, b) => (a.systemName < b.systemName ? -1 : a.systemName > b.systemName ? 1 : 0));
  }

  /** A page of one system's batches, each saying why it is not in the fit when it is not. */
  async points(
    query: TemperaturesOptions & { system: string; page: number; pageSize: number },
  ): Promise<TemperaturePointsPage> {
    const row = await this.store.one(query.system);
    const answers = row ? await this.answersOf(row) : null;
    // The model and the number of batches do not depend on which batches count.
    const total = answers?.all.counts.batches ?? 0;
    if (!total)
      throw AppError.notFound(`No batch with a temperature names the chemical system "${query.system}".`);
    const model = answers!.all.model;
    const rows = await this.batches.systemPoints(query.system, {
      offset: query.page * query.pageSize,
      limit: query.pageSize,
    });
    const items: TemperaturePoint[] = rows.map((r) => ({
      batchId: r.id,
      batchName: r.name,
      state: r.state,
      temperatureC: r.temperatureC,
      model: r.model,
      k: r.k,
      kSe: r.kSe,
      kCi95: r.kCi95,
      kText: r.kText,
      excludedBecause: excludedBecause(r, model, query),
    }));
    return { items, total, page: query.page, pageSize: query.pageSize };
  }

  /** The format stored answers must carry to be served: their shape and this server's analysis engine. */
  private get format(): string {
    return answersFormat(this.batches.engineVersion);
  }

  /** Stop background work and wait for what runs (shutdown). */
  async close(): Promise<void> {
    this.closing = true;
    this.unsubscribe();
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.refreshing;
  }

  /** Work out again, in a moment, the answers of every system a change has moved on (one timer at a time). */
  private refreshSoon(): void {
    if (this.timer || this.closing) return;
    this.timer = setTimeout(() => {
      this.timer = null;
      if (this.refreshing) return this.refreshSoon(); // once the run under way ends
      this.refreshing = (async () => {
        if (!this.closing) await this.answersOfAll(await this.store.all());
      })()
        .catch((err: unknown) => {
          if (!this.closing) this.log('Could not store the Temperatures answers', err);
        })
        .finally(() => {
          this.refreshing = null;
        });
    }, REFRESH_AFTER_MS);
    this.timer.unref();
  }

  /**
   * A system's answers: the stored ones while current, else worked out from its batches and stored. The
   * generation is the one read before the batches: a change in between leaves the stored answers stale.
   */
  private async answersOf(row: TemperatureSystemRow, batches?: SystemFitRow[]): Promise<SystemAnswers> {
    const stored = currentAnswers(row, this.format);
    if (stored) return stored;
    const rows = batches ?? (await this.batches.systemFitRows(row.systemName));
    const answers = {
      approved: systemOf(row.systemName, rows, {}),
      all: systemOf(row.systemName, rows, { includeUnapproved: true }),
    };
    await this.store.save(row.systemName, row.generation, this.format, answers);
    return answers;
  }

  /** The answers of these systems; when several are stale, their batches in one read of every system's. */
  private async answersOfAll(rows: readonly TemperatureSystemRow[]): Promise<SystemAnswers[]> {
    let bySystem: Map<string, SystemFitRow[]> | null = null;
    if (rows.filter((row) => !answersAreCurrent(row, this.format)).length > 1) {
      bySystem = new Map(rows.map((row) => [row.systemName, []]));
      for (const batch of await this.batches.systemFitRows()) bySystem.get(batch.systemName)?.push(batch);
    }
    const answers: SystemAnswers[] = [];
    for (const row of rows) answers.push(await this.answersOf(row, bySystem?.get(row.systemName)));
    return answers;
  }
}

/** One system's fit over all its usable batches (newest first, as they are read), counts and groups. */
function systemOf(systemName: string, rows: readonly SystemFitRow[], options: TemperaturesOptions) {
  const model = fitModel(rows);
  const used = rows.filter((r) => excludedBecause(r, model, options) === null);
  const temperatures = new Set(used.map((r) => r.temperatureC));
  let fit: VantHoffResult | null = null;
  let note: string;
  if (temperatures.size >= 2) {
    fit = vantHoff(used.map((r) => ({ temperatureC: r.temperatureC, k: r.k as number })));
    note = `van 't Hoff fit over ${used.length} batches at ${temperatures.size} temperatures (${model}).`;
    if (temperatures.size === 2) note += ' With two temperatures there is no standard error.';
  } else {
    note = `Needs approved batches at two or more temperatures; ${used.length} usable so far.`;
  }
  return {
    systemName,
    model,
    vantHoff: fit,
    note,
    counts: { batches: rows.length, used: used.length },
    groups: groupsOf(rows, new Set(used)),
  } satisfies SystemTemperatures;
}

/**
 * The stoichiometry the fit uses: the best model most batches found (on a tie, that of the newest batch,
 * by id). `rows` come newest first, so the first model met on a tie is the newest batch's.
 */
function fitModel(rows: readonly SystemFitRow[]): string | null {
  return mostFrequent(rows.flatMap((r) => (r.model ? [r.model] : [])));
}

/** Why a batch is left out of its system's fit; null when it is in it. */
function excludedBecause(
  batch: Pick<SystemFitRow, 'state' | 'model' | 'k'> & { kText?: string | null },
  model: string | null,
  options: TemperaturesOptions,
): string | null {
  if (!options.includeUnapproved && batch.state !== 'approved') return 'not approved yet';
  if (batch.k === null) return batch.kText ? `K ${batch.kText}` : 'no K from this batch';
  if (batch.model !== model) return `its best stoichiometry is ${batch.model}, not ${model}`;
  return null;
}

/** Batches per temperature (lowest first), and the geometric mean, least and greatest K of those in the fit. */
function groupsOf(rows: readonly SystemFitRow[], used: ReadonlySet<SystemFitRow>): TemperatureGroup[] {
  const byTemperature = new Map<number, { batches: number; k: number[] }>();
  for (const r of rows) {
    let group = byTemperature.get(r.temperatureC);
    if (!group) byTemperature.set(r.temperatureC, (group = { batches: 0, k: [] }));
    group.batches++;
    if (used.has(r)) group.k.push(r.k as number);
  }
  return [...byTemperature.entries()]
    .sort(([a], [b]) => a - b)
    .map(([temperatureC, { batches, k }]) => ({
      temperatureC,
      batches,
      used: k.length,
      kGeometricMean: k.length ? Math.exp(k.reduce((sum, v) => sum + Math.log(v), 0) / k.length) : null,
      kMin: k.length ? k.reduce((a, b) => Math.min(a, b)) : null,
      kMax: k.length ? k.reduce((a, b) => Math.max(a, b)) : null,
    }));
}

/** The value found most often; on a tie, the one found first. Null for none. */
function mostFrequent(values: readonly string[]): string | null {
  const counts = new Map<string, number>();
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1);
  let best: string | null = null;
  for (const [v, n] of counts) if (best === null || n > counts.get(best)!) best = v;
  return best;
}
