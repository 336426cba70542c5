import { type VantHoffResult, vantHoff } from '../analysis';
import { AppError } from '../common/app-error';
import type {
  SystemTemperatures,
  TemperatureGroup,
  TemperaturePoint,
  TemperaturePointsPage,
} from '../contracts/temperatures';
import type { BatchesService } from '../batches/batches.service';
import type { SystemFitRow, SystemModelCount } from '../batches/batch-list';

export type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';

/** Which batches count: approved ones only, unless asked. */
export interface TemperaturesOptions {
  includeUnapproved?: boolean;
}

/**
 * K of each chemical system at several temperatures and the van 't Hoff fit across them, from each
 * batch's stored headline (written when its analysis changed): no analysis here. The fit and the
 * per-temperature groups read five narrow columns of every batch of a system; the batches themselves
 * are listed a page at a time.
 */
export class TemperaturesService {
  constructor(private readonly batches: BatchesService) {}

  async systems(options: TemperaturesOptions = {}): Promise<SystemTemperatures[]> {
    const bySystem = new Map<string, SystemFitRow[]>();
    for (const row of await this.batches.systemFitRows()) {
      const list = bySystem.get(row.systemName);
      if (list) list.push(row);
      else bySystem.set(row.systemName, [row]);
    }
    return [...bySystem.keys()]
      .sort()
      .map((systemName) => systemOf(systemName, bySystem.get(systemName)!, options));
  }

  /** A page of one system's batches, each saying why it is not in the fit when it is not. */
  async points(
    query: TemperaturesOptions & { system: string; page: number; pageSize: number },
  ): Promise<TemperaturePointsPage> {
    const counts = await this.batches.systemModelCounts(query.system);
    const total = counts.reduce((sum, c) => sum + c.batches, 0);
    if (!total)
      throw AppError.notFound(`No batch with a temperature names the chemical system "${query.system}".`);
    const model = fitModelOfCounts(counts);
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

/** The same choice from the models counted by the database (a page of batches needs only the model). */
function fitModelOfCounts(counts: readonly SystemModelCount[]): string | null {
  let best: SystemModelCount | null = null;
  for (const c of counts) {
    if (c.model === null) continue;
    if (!best || c.batches > best.batches || (c.batches === best.batches && c.newestId > best.newestId))
      best = c;
  }
  return best?.model ?? null;
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
