import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { DateTimePipe } from '../format/date-format';

/** One saved version of something kept in versions (a layout, a manifest). */
export interface VersionEntry {
  version: number;
  createdAt: string;
  /** How the version was made (a manifest's "file" or "form"); shown when present. */
  source?: string;
}

/** The versions of what an editor shows, newest first, marking the current one and the one shown. */
@Component({
  selector: 'eq-version-history',
  imports: [DateTimePipe, MatButtonModule, MatIconModule],
  template: `<section class="eq-versions" aria-labelledby="versions-heading">
    <h2 id="versions-heading">Versions</h2>
    <ul [attr.data-testid]="testId()">
      @for (v of newestFirst(); track v.version) {
        <li>
          <span class="eq-num">v{{ v.version }}</span>
          <span class="eq-num">{{ v.createdAt | eqDate }}</span>
          @if (v.source) {
            <span class="eq-muted">{{ v.source }}</span>
          }
          @if (v.version === current()) {
            <span class="eq-mark">current</span>
          }
          @if (shown() === v.version) {
            <span class="eq-mark"><mat-icon inline>visibility</mat-icon> shown</span>
          } @else {
            <button mat-button type="button" (click)="view.emit(v.version)">View</button>
          }
        </li>
      }
    </ul>
  </section>`,
  styles: `
    :host {
      display: block;
    }
    .eq-versions {
      margin-top: 24px;
    }
    h2 {
      font: var(--mat-sys-title-medium);
    }
    ul {
      list-style: none;
      padding: 0;
      margin: 0;
    }
    li {
      display: flex;
      align-items: center;
      gap: 16px;
      min-height: 40px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    .eq-muted {
      color: var(--mat-sys-on-surface-variant);
    }
    .eq-mark {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      font: var(--mat-sys-label-medium);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionHistory {
  /** Oldest first, as the API lists them. */
  readonly versions = input.required<readonly VersionEntry[]>();
  readonly current = input.required<number>();
  /** The version on screen. */
  readonly shown = input.required<number>();
  /** `data-testid` of the list. */
  readonly testId = input('versions');
  /** The person asked to see this version. */
  readonly view = output<number>();

  protected readonly newestFirst = computed(() => [...this.versions()].reverse());
}
