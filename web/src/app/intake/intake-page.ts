import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { ActivatedRoute, RouterLink } from '@angular/router';
import {
  auditTime,
  catchError,
  combineLatest,
  debounceTime,
  distinctUntilChanged,
  filter,
  map,
  merge,
  of,
  skip,
  startWith,
  Subject,
  switchMap,
  tap,
} from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import { InstrumentsService } from '../instruments/instruments.service';
import { AssignDialog, type AssignDialogData, unassignedHint } from './assign-dialog';
import { FileSizePipe } from './file-size-pipe';
import {
  INTAKE_STATUSES,
  type IntakeFile,
  type IntakeQuery,
  type IntakeSort,
  type IntakeStatus,
  STATUS_DISPLAY,
} from './intake-file';
import { IntakeService } from './intake.service';
import { IntakeStatusLabel } from './intake-status-label';
import { UploadDialog, type UploadDialogData, type UploadProfileChoice } from './upload-dialog';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { Notice } from '../shared/page/notice';

/** Quiet time after the last live event before the page asks again; a burst of files costs one request. */
export const LIVE_REFRESH_DEBOUNCE_MS = 300;
export const FILTER_DEBOUNCE_MS = 300;

/** Lab managers and admins: every file received, live, with its state and what to do about a quarantined one. */
@Component({
  selector: 'eq-intake-page',
  imports: [
    DateTimePipe,
    TableScroll,
    DecimalPipe,
    FileSizePipe,
    IntakeStatusLabel,
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatIconModule,
    MatTooltipModule,
    MatProgressBarModule,
    RouterLink,
  ],
  templateUrl: './intake-page.html',
  styleUrl: './intake-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class IntakePage {
  private readonly intake = inject(IntakeService);
  private readonly instruments = inject(InstrumentsService);
  private readonly live = inject(LiveEventsService);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);

  protected readonly columns = [
    'status',
    'profileName',
    'originalName',
    'sizeBytes',
    'sha256',
    'receivedAt',
    'finishedAt',
    'readingCount',
    'runId',
    'error',
    'actions',
  ];
  protected readonly statuses = INTAKE_STATUSES.map((s) => [s, STATUS_DISPLAY[s].label] as const);
  protected readonly pageSizes = [25, 50, 100];

  protected readonly status = signal<IntakeStatus | ''>('');
  protected readonly profileId = signal<number | null>(null);
  /** `/intake?q=<sha256>` (a batch's file links here) opens the list filtered to that file. */
  protected readonly initialQ = (inject(ActivatedRoute).snapshot.queryParamMap.get('q') ?? '').slice(0, 200);
  protected readonly q = signal(this.initialQ.trim());
  protected readonly sort = signal<IntakeSort>('receivedAt');
  protected readonly dir = signal<'asc' | 'desc'>('desc');
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  private readonly query = computed<IntakeQuery>(() => ({
    status: this.status(),
    profileId: this.profileId(),
    q: this.q(),
    sort: this.sort(),
    dir: this.dir(),
    page: this.pageIndex(),
    pageSize: this.pageSize(),
  }));

  protected readonly items = signal<IntakeFile[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly requeueing = signal<ReadonlySet<number>>(new Set());
  protected readonly connected = this.live.connected;
  /** null until known; [] when the profiles could not be listed. */
  protected readonly profiles = signal<UploadProfileChoice[] | null>(null);
  private profilesFailed = false;

  private readonly reload$ = new Subject<void>();
  private readonly filterText$ = new Subject<string>();

  constructor() {
    this.filterText$
      .pipe(debounceTime(FILTER_DEBOUNCE_MS), takeUntilDestroyed())
      .subscribe((text) => this.setFilter(() => this.q.set(text.trim())));

    const liveChange$ = this.live.events$.pipe(
      filter((e) => e.type.startsWith('file.')),
      auditTime(LIVE_REFRESH_DEBOUNCE_MS),
    );
    // Events sent while the socket was down are lost: catch up once it is open again.
    const reconnected$ = toObservable(this.live.connected).pipe(
      distinctUntilChanged(),
      skip(1),
      filter((connected) => connected),
    );
    combineLatest([
      toObservable(this.query),
      merge(this.reload$, liveChange$, reconnected$).pipe(startWith(undefined)),
    ])
      .pipe(
        map(([query]) => query),
        tap(() => this.loading.set(true)),
        switchMap((query) =>
          this.intake.list(query).pipe(
            map((page) => ({ page, error: null })),
            catchError((err: unknown) => of({ page: null, error: apiErrorMessage(err) })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe(({ page, error }) => {
        this.loading.set(false);
        this.error.set(error);
        if (!page) return;
        this.items.set(page.items);
        this.total.set(page.total);
        // A shrinking list (e.g. a filter) can leave the page past the end.
        const lastPage = Math.max(0, Math.ceil(page.total / this.pageSize()) - 1);
        if (this.pageIndex() > lastPage) this.pageIndex.set(lastPage);
      });

    this.instruments
      .summary()
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (list) =>
          this.profiles.set(
            list
              .filter((p) => p.active)
              .map((p) => ({ id: p.id, name: p.name }))
              .sort((a, b) => a.name.localeCompare(b.name)),
          ),
        error: () => {
          this.profilesFailed = true;
          this.profiles.set([]);
        },
      });
  }

  protected onFilterInput(value: string): void {
    this.filterText$.next(value);
  }

  protected onStatus(status: IntakeStatus | ''): void {
    this.setFilter(() => this.status.set(status));
  }

  protected onProfile(id: number | null): void {
    this.setFilter(() => this.profileId.set(id));
  }

  protected onSort(sort: Sort): void {
    this.sort.set((sort.direction ? sort.active : 'receivedAt') as IntakeSort);
    this.dir.set(sort.direction || 'desc');
    this.pageIndex.set(0);
  }

  protected onPage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected refresh(): void {
    this.reload$.next();
  }

  /** Finished on the day it arrived: the time alone says enough. */
  protected sameDay(file: IntakeFile): boolean {
    if (!file.finishedAt) return false;
    return new Date(file.receivedAt).toDateString() === new Date(file.finishedAt).toDateString();
  }

  protected shortHash(sha256: string): string {
    return sha256.length > 12 ? `${sha256.slice(0, 12)}…` : sha256;
  }

  protected unassignedHint(file: IntakeFile): string {
    return unassignedHint(file.runId);
  }

  protected rawUrl(file: IntakeFile): string {
    return `/api/intake/raw/${file.sha256}`;
  }

  protected openAssign(file: IntakeFile): void {
    this.dialog
      .open<AssignDialog, AssignDialogData, IntakeFile>(AssignDialog, {
        data: { file },
        width: '560px',
        maxWidth: '96vw',
      })
      .afterClosed()
      .subscribe((assigned) => {
        if (!assigned) return;
        void this.notice.show(`${file.originalName} assigned to batch #${assigned.batchId}`, {
          action: 'OK',
          durationMs: 4000,
        });
        this.reload$.next();
      });
  }

  protected requeue(file: IntakeFile): void {
    this.requeueing.update((ids) => new Set(ids).add(file.id));
    const done = () =>
      this.requeueing.update((ids) => {
        const next = new Set(ids);
        next.delete(file.id);
        return next;
      });
    this.intake.requeue(file.id).subscribe({
      next: () => {
        done();
        void this.notice.show(`${file.originalName} (#${file.id}) re-queued`, {
          action: 'OK',
          durationMs: 4000,
        });
        this.reload$.next();
      },
      error: (err: unknown) => {
        done();
        void this.notice.show(apiErrorMessage(err), { action: 'OK' });
      },
    });
  }

  protected openUpload(): void {
    this.dialog
      .open<UploadDialog, UploadDialogData>(UploadDialog, {
        data: { profiles: this.profilesFailed ? null : (this.profiles() ?? []) },
        width: '520px',
        maxWidth: '96vw',
      })
      .afterClosed()
      .subscribe(() => this.reload$.next());
  }

  private setFilter(change: () => void): void {
    change();
    this.pageIndex.set(0);
  }
}
