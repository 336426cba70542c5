import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import type { BatchResult, CandidateResult, IceRow, MixtureResult } from '@equilight/analysis';
import { jobChart } from './chart-data';
import { formatAbsorbance, formatNumber, formatPercent, kUnitOf } from './number-format';
import { ScatterChart } from './scatter-chart';

export interface IceTable {
  mixture: MixtureResult;
  row: IceRow | null;
  a: number;
  b: number;
}

/** The per-mixture ICE table under one candidate: initial, change (−a·x, −b·x, +x), equilibrium. */
export function iceTablesFor(mixtures: readonly MixtureResult[], model: string): IceTable[] {
  const [a, b] = model.split(':').map(Number);
  return mixtures.map((mixture) => ({
    mixture,
    row: mixture.ice.find((r) => r.model === model) ?? null,
    a,
    b,
  }));
}

/** Stoichiometry, K per candidate, the verdict, ICE tables, uncertainty, Job's plot and Benesi–Hildebrand. */
@Component({
  selector: 'eq-equilibrium-panel',
  imports: [ScatterChart, MatFormFieldModule, MatSelectModule, MatIconModule],
  templateUrl: './equilibrium-panel.html',
  styleUrl: './panels.scss',
  styles: `
    .eq-verdict {
      font: var(--mat-sys-title-large);
      margin: 0 0 12px;
    }
    .eq-ice-grid {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(300px, 1fr));
      gap: 12px 20px;
    }
    .eq-ice-grid table caption {
      font: var(--mat-sys-title-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EquilibriumPanel {
  readonly result = input.required<BatchResult>();

  protected readonly stoichiometry = computed(() => this.result().stoichiometry);
  protected readonly candidates = computed<CandidateResult[]>(() => this.stoichiometry()?.candidates ?? []);
  /** The candidate whose ICE tables are shown: the best one until a person picks another. */
  protected readonly chosen = linkedSignal<string | null>(() => {
    const s = this.stoichiometry();
    return s?.best ?? s?.candidates[0]?.model ?? this.result().settings.candidates[0] ?? null;
  });
  protected readonly chosenCandidate = computed(
    () => this.candidates().find((c) => c.model === this.chosen()) ?? null,
  );
  protected readonly ice = computed(() => {
    const m = this.chosen();
    return m ? iceTablesFor(this.result().mixtures, m) : [];
  });
  protected readonly job = computed(() => {
    const r = this.result();
    return r.job ? jobChart(r.job, r.mixtures) : null;
  });

  protected readonly fmt = formatNumber;
  protected readonly pct = formatPercent;
  protected readonly abs = formatAbsorbance;
  protected readonly unit = kUnitOf;

  protected ci(pair: readonly [number | null, number | null] | null | undefined): string {
    return pair ? `${formatNumber(pair[0])} – ${formatNumber(pair[1])}` : '—';
  }

  protected coefficient(n: number): string {
    return n === 1 ? '' : String(n);
  }
}
