import { ChangeDetectionStrategy, Component, effect, inject, signal, viewChild } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import { auditTime, catchError, EMPTY, merge, startWith, Subject, switchMap } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import { BATCH_STATE_DISPLAY, type Batch } from './batch';
import { BatchStateLabel } from '../shared/batch-state/batch-state-label';
import { summaryK } from '../shared/format/summary-k';
import { BatchesService } from './batches.service';
import { DateTimePipe } from '../shared/format/date-format';

/** Quiet time after the last live event before the list is fetched again; a burst costs one request. */
export const BATCHES_LIVE_DEBOUNCE_MS = 300;

/** Everyone: every batch with its state, what it is made of, and how many of its files have arrived. */
@Component({
  selector: 'eq-batches-page',
  imports: [
    DateTimePipe,
    RouterLink,
    BatchStateLabel,
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatTooltipModule,
  ],
  templateUrl: './batches-page.html',
  styleUrl: './batches-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchesPage {
  private readonly batches = inject(BatchesService);
  protected readonly live = inject(LiveEventsService);
  protected readonly canCreate = inject(AuthService).hasRole('admin', 'lab_manager');

  protected readonly summaryK = summaryK;

  protected readonly columns = [
    'name',
    'state',
    'instrument',
    'runId',
    'files',
    'qc',
    'best',
    'lastActivityAt',
  ];
  protected readonly dataSource = new MatTableDataSource<Batch>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);
  private readonly refresh$ = new Subject<void>();

  constructor() {
    this.dataSource.filterPredicate = (b, filter) =>
      [
        b.name,
        BATCH_STATE_DISPLAY[b.state].label,
        b.profileName,
        b.layoutName,
        b.manifestName,
        b.runId,
        b.systemName,
      ]
        .join(' ')
        .toLowerCase()
        .includes(filter);
    this.dataSource.sortingDataAccessor = (b, column) => {
      switch (column) {
        case 'instrument':
          return (b.profileName ?? '').toLowerCase();
        case 'files':
          return b.fileCount / Math.max(1, b.expectedFiles);
        case 'state':
          return ['open', 'reviewed', 'approved'].indexOf(b.state);
        case 'name':
          return b.name.toLowerCase();
        case 'runId':
          return b.runId.toLowerCase();
        default:
          return b.lastActivityAt;
      }
    };
    effect(() => {
      const sort = this.sort();
      if (sort) this.dataSource.sort = sort;
    });
    effect(() => {
      const paginator = this.paginator();
      if (paginator) this.dataSource.paginator = paginator;
    });

    merge(
      this.refresh$,
      this.live.ofType('batch.updated', 'file.stored').pipe(auditTime(BATCHES_LIVE_DEBOUNCE_MS)),
    )
      .pipe(
        startWith(undefined),
        // A failed fetch shows its message and keeps the page listening for the next event or refresh.
        switchMap(() =>
          this.batches.list().pipe(
            catchError((err: unknown) => {
              this.error.set(apiErrorMessage(err));
              this.loading.set(false);
              return EMPTY;
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((rows) => {
        this.dataSource.data = rows;
        this.error.set(null);
        this.loading.set(false);
      });
  }

  protected reload(): void {
    this.loading.set(true);
    this.refresh$.next();
  }

  protected applyFilter(value: string): void {
    this.dataSource.filter = value.trim().toLowerCase();
    this.dataSource.paginator?.firstPage();
  }
}
