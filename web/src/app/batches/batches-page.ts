import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import {
  auditTime,
  catchError,
  debounceTime,
  distinctUntilChanged,
  filter,
  map,
  merge,
  of,
  skip,
  Subject,
  switchMap,
  tap,
} from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import { BatchStateLabel } from '../shared/batch-state/batch-state-label';
import { summaryK } from '../shared/format/summary-k';
import {
  BATCH_STATE_DISPLAY,
  BATCH_STATES,
  type BatchListItem,
  type BatchListRequest,
  type BatchPage,
  type BatchSort,
  type BatchState,
} from './batch';
import { BatchesService } from './batches.service';
import { mergeLiveRows } from './live-rows';
import { DateTimePipe } from '../shared/format/date-format';

/** Quiet time after the last live event before the list is fetched again; a burst costs one request. */
export const BATCHES_LIVE_DEBOUNCE_MS = 300;
/** Quiet time after the last key in the search field before the list is asked for. */
export const BATCHES_SEARCH_DEBOUNCE_MS = 300;

/** The sort key of each sortable column. */
const SORT_OF_COLUMN: Record<string, BatchSort> = {
  name: 'name',
  state: 'state',
  instrument: 'instrument',
  runId: 'runId',
  files: 'files',
  qc: 'qc',
  best: 'k',
  lastActivityAt: 'lastActivityAt',
};

/** Why the list is fetched: a person's request shows the answer as it is; a live event merges it in. */
type Trigger = 'person' | 'live';

/**
 * Everyone: a page of batches with their state, what they are made of, how many files have arrived and
 * their stored headline. Paged, sorted, filtered and searched on the server; live events update the
 * rows in place and hold new batches back behind a "show" button, so nothing moves under the pointer.
 */
@Component({
  selector: 'eq-batches-page',
  imports: [
    DateTimePipe,
    RouterLink,
    BatchStateLabel,
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
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
  protected readonly states = BATCH_STATES.map((s) => [s, BATCH_STATE_DISPLAY[s].label] as const);
  protected readonly pageSizes = [25, 50, 100];
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

  protected readonly state = signal<BatchState | ''>('');
  protected readonly q = signal('');
  protected readonly sortColumn = signal('lastActivityAt');
  protected readonly dir = signal<'asc' | 'desc'>('desc');
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  private readonly query = computed<BatchListRequest>(() => ({
    state: this.state(),
    q: this.q(),
    sort: SORT_OF_COLUMN[this.sortColumn()] ?? 'lastActivityAt',
    dir: this.dir(),
    page: this.pageIndex(),
    pageSize: this.pageSize(),
  }));

  protected readonly rows = signal<BatchListItem[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  /** A fresh page held back while the person works in the table, and how many of its batches are new. */
  private readonly held = signal<BatchListItem[] | null>(null);
  protected readonly newCount = signal(0);
  /** What a screen reader hears when batches arrive (a polite live region). */
  protected readonly announcement = signal('');
  /** The pointer is over the table, or the keyboard focus is in it: rows must not move. */
  private readonly pointerIn = signal(false);
  private readonly focusIn = signal(false);
  private readonly steady = computed(() => this.pointerIn() || this.focusIn());

  private readonly reload$ = new Subject<void>();
  private readonly search$ = new Subject<string>();

  protected readonly trackById = (_: number, b: BatchListItem) => b.id;

  constructor() {
    this.search$
      .pipe(debounceTime(BATCHES_SEARCH_DEBOUNCE_MS), distinctUntilChanged(), takeUntilDestroyed())
      .subscribe((text) => this.setFilter(() => this.q.set(text.trim())));

    // Events sent while the socket was down are lost: catch up once it is open again.
    const reconnected$ = toObservable(this.live.connected).pipe(
      distinctUntilChanged(),
      skip(1),
      filter((connected) => connected),
    );
    const live$ = merge(
      this.live.ofType('batch.updated', 'file.stored').pipe(auditTime(BATCHES_LIVE_DEBOUNCE_MS)),
      reconnected$,
    ).pipe(map((): Trigger => 'live'));
    const asked$ = merge(toObservable(this.query), this.reload$).pipe(map((): Trigger => 'person'));

    merge(asked$, live$)
      .pipe(
        tap((trigger) => trigger === 'person' && this.loading.set(true)),
        // A failed fetch shows its message and keeps the page listening for the next event or request.
        switchMap((trigger) =>
          this.batches.list(this.query()).pipe(
            map((page) => ({ trigger, page, error: null })),
            catchError((err: unknown) => of({ trigger, page: null, error: apiErrorMessage(err) })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe(({ trigger, page, error }) => {
        this.loading.set(false);
        this.error.set(error);
        if (!page) return;
        if (trigger === 'person') this.show(page.items);
        else this.mergeLive(page);
        this.total.set(page.total);
        // A shrinking list (a filter, a search) can leave the page past the end.
        const lastPage = Math.max(0, Math.ceil(page.total / this.pageSize()) - 1);
        if (this.pageIndex() > lastPage) this.pageIndex.set(lastPage);
      });

    // Leaving the table lets a held reordering (without new batches) show.
    toObservable(this.steady)
      .pipe(
        filter((steady) => !steady),
        takeUntilDestroyed(),
      )
      .subscribe(() => {
        const held = this.held();
        if (held && this.newCount() === 0) this.show(held);
      });
  }

  private show(items: BatchListItem[]): void {
    this.rows.set(items);
    this.held.set(null);
    this.newCount.set(0);
  }

  private mergeLive(page: BatchPage): void {
    const merged = mergeLiveRows(this.rows(), page.items, this.steady());
    this.rows.set(merged.rows);
    this.held.set(merged.held);
    if (merged.newCount !== this.newCount() && merged.newCount > 0)
      this.announcement.set(
        `${merged.newCount} new batch${merged.newCount === 1 ? '' : 'es'} on this page. Use “Show” to see ${merged.newCount === 1 ? 'it' : 'them'}.`,
      );
    this.newCount.set(merged.newCount);
  }

  /** The "N new batches — show" button: the held page, in its own order. */
  protected showHeld(): void {
    const held = this.held();
    if (held) this.show(held);
    this.announcement.set('');
  }

  protected setPointerIn(inside: boolean): void {
    this.pointerIn.set(inside);
  }

  protected onFocusIn(): void {
    this.focusIn.set(true);
  }

  protected onFocusOut(event: FocusEvent): void {
    const to = event.relatedTarget as Node | null;
    if (!to || !(event.currentTarget as HTMLElement).contains(to)) this.focusIn.set(false);
  }

  protected reload(): void {
    this.reload$.next();
  }

  protected onSearchInput(value: string): void {
    this.search$.next(value);
  }

  protected onState(state: BatchState | ''): void {
    this.setFilter(() => this.state.set(state));
  }

  protected onSort(sort: Sort): void {
    this.sortColumn.set(sort.direction ? sort.active : 'lastActivityAt');
    this.dir.set(sort.direction || 'desc');
    this.pageIndex.set(0);
  }

  protected onPage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  private setFilter(change: () => void): void {
    change();
    this.pageIndex.set(0);
  }
}
