import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { type QcFlag, qcFindingPositions } from '@equilight/analysis';
import { SEVERITY_DISPLAY, guidanceFor } from '../shared/qc/qc-guidance';

/** Every QC flag, worst first, with what it means and what to do; severity as icon and word. */
@Component({
  selector: 'eq-qc-panel',
  imports: [MatIconModule],
  template: `
    @if (items().length) {
      <ul class="eq-qc" data-testid="qc-list">
        @for (item of items(); track $index) {
          <li class="eq-qc__item" [attr.data-severity]="item.flag.severity" [attr.data-code]="item.flag.code">
            <div class="eq-qc__head">
              <span class="eq-qc__severity"
                ><mat-icon aria-hidden="true">{{ item.severity.icon }}</mat-icon
                >{{ item.severity.label }}</span
              >
              <strong>{{ item.guidance.title }}</strong>
              @if (item.where) {
                <span class="eq-qc__where">{{ item.where }}</span>
              }
            </div>
            <p class="eq-qc__message">{{ item.message }}</p>
            <p><span class="eq-qc__label">What it means:</span> {{ item.guidance.meaning }}</p>
            <p><span class="eq-qc__label">What to do:</span> {{ item.guidance.action }}</p>
          </li>
        }
      </ul>
    } @else {
      <p class="eq-empty" data-testid="qc-none">
        <mat-icon inline aria-hidden="true">check_circle</mat-icon> No QC flags.
      </p>
    }
    @if (warnings().length) {
      <h3 class="eq-subhead">Notes from the analysis</h3>
      <ul class="eq-notes">
        @for (w of warnings(); track $index) {
          <li>{{ w }}</li>
        }
      </ul>
    }
  `,
  styleUrl: './panels.scss',
  styles: `
    .eq-qc {
      list-style: none;
      padding: 0;
      margin: 0;
      display: grid;
      gap: 10px;
    }
    .eq-qc__item {
      border: 1px solid var(--mat-sys-outline-variant);
      border-left-width: 6px;
      border-radius: 8px;
      padding: 10px 14px;
      p {
        margin: 4px 0;
        font: var(--mat-sys-body-medium);
      }
    }
    .eq-qc__item[data-severity='error'] {
      border-left-color: var(--mat-sys-error);
    }
    .eq-qc__item[data-severity='warning'] {
      border-left-color: var(--mat-sys-tertiary);
    }
    .eq-qc__head {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px;
    }
    .eq-qc__severity {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      font: var(--mat-sys-label-large);
    }
    .eq-qc__where,
    .eq-qc__label {
      color: var(--mat-sys-on-surface-variant);
    }
    .eq-qc__message {
      font-style: italic;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QcPanel {
  readonly flags = input.required<readonly QcFlag[]>();
  readonly warnings = input<readonly string[]>([]);

  protected readonly items = computed(() =>
    [...this.flags()]
      .map((flag) => ({
        flag,
        message: messageAfterPlace(flag),
        where: placeOf(flag),
        severity: SEVERITY_DISPLAY[flag.severity],
        guidance: guidanceFor(flag.code),
      }))
      .sort((a, b) => a.severity.rank - b.severity.rank),
  );
}

/**
 * A finding's message without its leading "C8: " when the line already says where ("at C8"), so the
 * position is not read twice.
 */
export function messageAfterPlace(flag: QcFlag): string {
  for (const place of [flag.position, flag.sampleId]) {
    const prefix = place ? `${place}: ` : null;
    if (prefix && flag.message.startsWith(prefix)) return flag.message.slice(prefix.length);
  }
  return flag.message;
}

/** Where a finding is, once: "TAP-001 at C1, C2, C3", "at C8" or "TAP-001". */
export function placeOf(flag: QcFlag): string {
  const positions = qcFindingPositions(flag).join(', ');
  const at = positions ? `at ${positions}` : '';
  return [flag.sampleId ?? '', at].filter(Boolean).join(' ');
}
