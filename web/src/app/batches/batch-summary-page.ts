import { DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, input, numberAttribute, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { auditTime, catchError, filter, merge, of, startWith, switchMap } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import type { Batch } from './batch';
import { BatchStateLabel } from '../shared/batch-state/batch-state-label';
import { BATCHES_LIVE_DEBOUNCE_MS } from './batches-page';
import { BatchesService } from './batches.service';
import { DateTimePipe } from '../shared/format/date-format';

/** Everyone: a read-only summary of one batch — its state, what it is made of, its files and settings. */
@Component({
  selector: 'eq-batch-summary-page',
  imports: [
    DateTimePipe,
    DecimalPipe,
    PercentPipe,
    RouterLink,
    BatchStateLabel,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './batch-summary-page.html',
  styleUrl: './batch-summary-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchSummaryPage {
  private readonly batches = inject(BatchesService);
  private readonly live = inject(LiveEventsService);

  /** From the route, `batches/:id`. */
  readonly id = input.required({ transform: numberAttribute });

  protected readonly batch = signal<Batch | null>(null);
  protected readonly error = signal<string | null>(null);

  constructor() {
    toObservable(this.id)
      .pipe(
        switchMap((id) =>
          merge(
            this.live.ofType('batch.updated').pipe(filter((e) => e.data.id === id)),
            this.live.ofType('file.stored').pipe(filter((e) => e.data['batchId'] === id)),
          ).pipe(
            auditTime(BATCHES_LIVE_DEBOUNCE_MS),
            startWith(null),
            switchMap(() =>
              this.batches.get(id).pipe(
                catchError((err: unknown) => {
                  this.error.set(apiErrorMessage(err));
                  return of(null);
                }),
              ),
            ),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((batch) => {
        if (!batch) return;
        this.batch.set(batch);
        this.error.set(null);
      });
  }
}
