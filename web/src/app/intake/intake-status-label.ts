import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import { type IntakeStatus, STATUS_DISPLAY } from './intake-file';

/** A file's state as icon + word (never colour alone), with what it means on hover. */
@Component({
  selector: 'eq-intake-status',
  imports: [MatIconModule, MatTooltipModule],
  template: `
    <span class="eq-intake-status" [class]="'eq-s-' + status()" [matTooltip]="display().hint">
      <mat-icon inline aria-hidden="true">{{ display().icon }}</mat-icon>
      <span>{{ display().label }}</span>
      @if (status() === 'duplicate' && duplicateOfId() !== null) {
        <span class="eq-dup">of #{{ duplicateOfId() }}</span>
      }
    </span>
  `,
  styles: `
    .eq-intake-status {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      white-space: nowrap;
    }
    .eq-s-stored mat-icon {
      color: var(--mat-sys-primary);
    }
    .eq-s-quarantined {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
    .eq-s-queued,
    .eq-s-parsing,
    .eq-s-duplicate,
    .eq-s-unassigned {
      color: var(--mat-sys-on-surface-variant);
    }
    .eq-s-parsing mat-icon {
      animation: eq-spin 1.6s linear infinite;
    }
    @keyframes eq-spin {
      to {
        transform: rotate(-360deg);
      }
    }
    @media (prefers-reduced-motion: reduce) {
      .eq-s-parsing mat-icon {
        animation: none;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class IntakeStatusLabel {
  readonly status = input.required<IntakeStatus>();
  readonly duplicateOfId = input<number | null>(null);
  protected readonly display = computed(() => STATUS_DISPLAY[this.status()]);
}
