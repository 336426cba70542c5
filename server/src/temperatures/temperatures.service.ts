import { type VantHoffResult, vantHoff } from '../analysis';
import type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';
import type { BatchesService } from '../batches/batches.service';
import type { SystemBatch } from '../batches/batch-list';

export type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';

/** K of one system at several temperatures (approved batches) and the van 't Hoff fit across them. */
export class TemperaturesService {
  constructor(private readonly batches: BatchesService) {}

  async systems(options: { includeUnapproved?: boolean } = {}): Promise<SystemTemperatures[]> {
    const bySystem = new Map<string, SystemBatch[]>();
    for (const batch of await this.batches.withSystemAndTemperature()) {
      const list = bySystem.get(batch.systemName);
      if (list) list.push(batch);
      else bySystem.set(batch.systemName, [batch]);
    }
    const out: SystemTemperatures[] = [];
    for (const systemName of [...bySystem.keys()].sort()) {
      // Each batch's stored headline (written when its analysis changed): no analysis here.
      const points: TemperaturePoint[] = bySystem.get(systemName)!.map((batch) => ({
        batchId: batch.id,
        batchName: batch.name,
        state: batch.state,
        temperatureC: batch.temperatureC,
        model: batch.summary?.best ?? null,
        k: batch.summary?.k ?? null,
        kSe: batch.summary?.kSe ?? null,
        kCi95: batch.summary?.kCi95 ?? null,
        kText: batch.summary?.kText ?? null,
        excludedBecause: null,
      }));
      const model = mostFrequent(points.flatMap((p) => (p.model ? [p.model] : [])));
      for (const p of points) {
        if (!options.includeUnapproved && p.state !== 'approved') p.excludedBecause = 'not approved yet';
        else if (p.k === null) p.excludedBecause = p.kText ? `K ${p.kText}` : 'no K from this batch';
        else if (p.model !== model) p.excludedBecause = `its best stoichiometry is ${p.model}, not ${model}`;
      }
      const used = points.filter((p) => !p.excludedBecause);
      const temperatures = new Set(used.map((p) => p.temperatureC));
      let fit: VantHoffResult | null = null;
      let note: string;
      if (temperatures.size >= 2) {
        fit = vantHoff(used.map((p) => ({ temperatureC: p.temperatureC, k: p.k as number })));
        note = `van 't Hoff fit over ${used.length} batches at ${temperatures.size} temperatures (${model}).`;
        if (temperatures.size === 2) note += ' With two temperatures there is no standard error.';
      } else {
        note = `Needs approved batches at two or more temperatures; ${used.length} usable so far.`;
      }
      out.push({
        systemName,
        model,
        points: points.sort((a, b) => a.temperatureC - b.temperatureC),
        vantHoff: fit,
        note,
      });
    }
    return out;
  }
}

/** The value found most often; on a tie, the one found first. Null for none. */
function mostFrequent(values: readonly string[]): string | null {
  const counts = new Map<string, number>();
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1);
  let best: string | null = null;
  for (const [v, n] of counts) if (best === null || n > counts.get(best)!) best = v;
  return best;
}
