import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { PlanRow } from './mixture-plan';
import { ScientificPipe } from './scientific-pipe';

/** The pipetting table of a plan: volumes per mixture, the resulting concentrations and the predicted absorbance. */
@Component({
  selector: 'eq-pipetting-table',
  imports: [DecimalPipe, MatIconModule, ScientificPipe],
  templateUrl: './pipetting-table.html',
  styleUrl: './pipetting-table.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PipettingTable {
  readonly rows = input.required<readonly PlanRow[]>();
  /** Adds an empty tick box per line, for the printed prep sheet. */
  readonly withTicks = input(false);
  readonly linearRangeMaxAbsorbance = input.required<number>();
  /** µL for plate wells, mL for cuvettes (all rows of a plan share one unit). */
  protected readonly unit = computed(() => this.rows()[0]?.volumeUnit ?? 'mL');
  /** 0.001 mL and 0.1 µL: the same pipetting resolution shown in either unit. */
  protected readonly digits = computed(() => (this.unit() === 'µL' ? '1.1-1' : '1.3-3'));
}
