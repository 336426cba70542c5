import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';

/**
 * Shown where a section that loads its script on demand could not get it (`@defer … @error`): most
 * often the app was updated since the page was opened. Reloading loads the new build.
 */
@Component({
  selector: 'eq-part-not-loaded',
  imports: [MatButtonModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `<p class="eq-error-text eq-part-not-loaded" role="alert" data-testid="part-not-loaded">
    This part of the page could not be loaded; Equilight may have been updated since the page was opened.
    <button mat-button type="button" (click)="reload()">Reload the page</button>
  </p>`,
  styles: `
    .eq-part-not-loaded {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
    }
  `,
})
export class PartNotLoaded {
  protected reload(): void {
    location.reload();
  }
}
