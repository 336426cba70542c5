import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input } from '@angular/core';
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
}
