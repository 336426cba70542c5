import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, ViewEncapsulation, input } from '@angular/core';
import { type PlanRow, type PlannerSettings, kUnit } from './mixture-plan';
import { PipettingTable } from './pipetting-table';
import { ScientificPipe } from './scientific-pipe';
import { DateTimePipe } from '../shared/format/date-format';

/**
 * The printable prep sheet of a plan. Hidden on screen; when printing, it is the only thing on the page.
 * Not encapsulated, because its print rules must also hide the app's toolbar and navigation.
 */
@Component({
  selector: 'eq-prep-sheet',
  imports: [DateTimePipe, DecimalPipe, PipettingTable, ScientificPipe],
  templateUrl: './prep-sheet.html',
  styleUrl: './prep-sheet.scss',
  encapsulation: ViewEncapsulation.None,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PrepSheet {
  readonly rows = input.required<readonly PlanRow[]>();
  readonly settings = input.required<PlannerSettings>();
  readonly cautions = input.required<readonly string[]>();
  readonly preparedAt = input.required<Date>();

  protected kUnit(stoichiometry: string): string {
    return kUnit(stoichiometry);
  }
}
