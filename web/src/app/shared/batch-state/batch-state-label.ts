import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { BATCH_STATE_DISPLAY, type BatchState } from '../../batches/batch';

/** A batch state as icon and word. */
@Component({
  selector: 'eq-batch-state-label',
  imports: [MatIconModule],
  template: `<span class="eq-state" [attr.data-state]="state()"
    ><mat-icon inline aria-hidden="true">{{ display().icon }}</mat-icon
    >{{ display().label }}</span
  >`,
  styles: `
    .eq-state {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 10px 2px 8px;
      border-radius: 999px;
      border: 1px solid var(--mat-sys-outline-variant);
      white-space: nowrap;
    }
    [data-state='reviewed'] {
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    [data-state='approved'] {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchStateLabel {
  readonly state = input.required<BatchState>();
  protected readonly display = computed(() => BATCH_STATE_DISPLAY[this.state()]);
}
