import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';

/**
 * A page's title row: an optional back link, the heading (with the version shown, for an editor) and the
 * page's own actions, projected after the heading. Put it on the page's `<header>`:
 * `<header eqPageHeader heading="Layouts"><a mat-flat-button …>New layout</a></header>`.
 */
@Component({
  selector: 'header[eqPageHeader]',
  imports: [MatButtonModule, MatIconModule, RouterLink],
  host: { class: 'eq-page-header' },
  template: `@if (backLink(); as link) {
      <a mat-icon-button [routerLink]="link" [attr.aria-label]="backLabel()"
        ><mat-icon>arrow_back</mat-icon></a
      >
    }
    <h1>
      {{ heading() }}
      @if (version() !== null) {
        <span class="eq-version eq-num">v{{ version() }}</span>
      }
    </h1>
    <ng-content />`,
  styles: `
    .eq-version {
      font: var(--mat-sys-title-medium);
      color: var(--mat-sys-on-surface-variant);
      margin-left: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PageHeader {
  readonly heading = input.required<string>();
  /** The current version of what the page edits; null shows none. */
  readonly version = input<number | null>(null);
  /** Where the back arrow leads; none without it. */
  readonly backLink = input<string | null>(null);
  readonly backLabel = input('Back');
}
