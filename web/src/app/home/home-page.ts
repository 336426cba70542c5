import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { auditTime, catchError, EMPTY, merge, startWith, Subject, switchMap } from 'rxjs';
import { BatchStateLabel } from '../shared/batch-state/batch-state-label';
import { AuthService } from '../core/auth/auth.service';
import { ROLE_LABELS } from '../core/auth/user';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import { navItemsFor } from '../core/shell/navigation';
import type { Overview, OverviewBatch, OverviewQc } from './overview';
import { OverviewService } from './overview.service';
import { DateTimePipe } from '../shared/format/date-format';

/** Quiet time after the last live event before the Overview is fetched again; a burst costs one request. */
export const OVERVIEW_LIVE_DEBOUNCE_MS = 500;

/** Files stored of those expected, and the readings they hold, in words. */
export function progressText(
  b: Pick<OverviewBatch, 'storedFiles' | 'expectedFiles' | 'readingCount'>,
): string {
  const files =
    b.expectedFiles > 0
      ? `${b.storedFiles} / ${b.expectedFiles} files`
      : `${b.storedFiles} ${b.storedFiles === 1 ? 'file' : 'files'}`;
  return `${files} · ${b.readingCount} ${b.readingCount === 1 ? 'reading' : 'readings'}`;
}

/** What is known of a batch's QC without running its analysis. */
export function qcText(qc: OverviewQc): string {
  if (qc.state === 'no-files') return 'No files yet';
  if (qc.state === 'not-analysed' || qc.flagCount === null) return 'QC not worked out yet: open the batch';
  if (qc.flagCount === 0) return 'QC: no findings';
  const errors = qc.errorCount ? ` (${qc.errorCount} ${qc.errorCount === 1 ? 'error' : 'errors'})` : '';
  return `QC: ${qc.flagCount} ${qc.flagCount === 1 ? 'finding' : 'findings'}${errors}`;
}

/** The signed-in person's starting point: what is open, what waits for them, what went wrong today. */
@Component({
  selector: 'eq-home-page',
  imports: [
    DateTimePipe,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatListModule,
    MatProgressBarModule,
    RouterLink,
    BatchStateLabel,
  ],
  templateUrl: './home-page.html',
  styleUrl: './home-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HomePage {
  private readonly auth = inject(AuthService);
  private readonly overviewService = inject(OverviewService);
  private readonly live = inject(LiveEventsService);
  private readonly refresh$ = new Subject<void>();

  protected readonly user = this.auth.currentUser;
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : '';
  });
  protected readonly links = computed(() =>
    navItemsFor(this.user()?.role).filter((item) => item.path !== '/'),
  );
  protected readonly overview = signal<Overview | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  /** The Instruments page is the administrators'. */
  protected readonly canOpenInstruments = computed(() => this.auth.hasRole('admin'));
  protected readonly progressText = progressText;
  protected readonly qcText = qcText;

  constructor() {
    merge(
      this.refresh$,
      this.live
        .ofType('batch.updated', 'file.stored', 'file.quarantined')
        .pipe(auditTime(OVERVIEW_LIVE_DEBOUNCE_MS)),
    )
      .pipe(
        startWith(undefined),
        // The last request wins; a failed one shows its message and the page keeps listening.
        switchMap(() =>
          this.overviewService.get().pipe(
            catchError((err: unknown) => {
              this.error.set(apiErrorMessage(err));
              this.loading.set(false);
              return EMPTY;
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((overview) => {
        this.overview.set(overview);
        this.error.set(null);
        this.loading.set(false);
      });
  }

  protected reload(): void {
    this.loading.set(true);
    this.refresh$.next();
  }

  protected openSubtitle(o: Overview): string {
    const shown = o.openBatches.items.length;
    const more = o.openBatches.total > shown ? ` · newest ${shown} shown` : '';
    return `${o.openBatches.total} not approved${more}`;
  }

  protected progressValue(b: OverviewBatch): number {
    return b.expectedFiles > 0 ? Math.min(100, (100 * b.storedFiles) / b.expectedFiles) : 0;
  }
}
