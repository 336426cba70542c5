import { type VantHoffResult, vantHoff } from '../analysis';
import type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';
import type { BatchesService } from '../batches/batches.service';

export type { SystemTemperatures, TemperaturePoint } from '../contracts/temperatures';

/** K of one system at several temperatures (approved batches) and the van 't Hoff fit across them. */
export class TemperaturesService {
  constructor(private readonly batches: BatchesService) {}

  async systems(options: { includeUnapproved?: boolean } = {}): Promise<SystemTemperatures[]> {
    const all = await this.batches.withSystemAndTemperature();
    const names = [...new Set(all.map((b) => b.systemName as string))].sort();
    const out: SystemTemperatures[] = [];
    for (const systemName of names) {
      const points: TemperaturePoint[] = [];
      // Each batch's stored headline (written when its analysis changed): no analysis here.
      for (const batch of all.filter((b) => b.systemName === systemName)) {
        const summary = batch.summary;
        points.push({
          batchId: batch.id,
          batchName: batch.name,
          state: batch.state,
          temperatureC: batch.temperatureC as number,
          model: summary?.best ?? null,
          k: summary?.k ?? null,
          kSe: summary?.kSe ?? null,
          kCi95: summary?.kCi95 ?? null,
          kText: summary?.kText ?? null,
          excludedBecause: null,
        });
      }
      const models = points.filter((p) => p.model).map((p) => p.model as string);
      const model =
        models.sort(
          (a, b) => models.filter((m) => m === b).length - models.filter((m) => m === a).length,
        )[0] ?? null;
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
